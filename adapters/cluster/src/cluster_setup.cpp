#include "liveprob/cluster/cluster_setup.hpp"

#include <fmt/format.h>

#include <string>

namespace liveprob::cluster {
namespace {

constexpr std::int64_t kNanosPerMilli = 1'000'000;

std::string feed_description(const ClusterLayout& layout) {
    // Names the subject scheme too: a stream of an older scheme is refused, not mis-read.
    return fmt::format("liveprob feed: {} partitions, a subject per match", layout.partitions);
}

KvStoreHandle ensure_bucket(jsCtx* js, const std::string& bucket, const std::string& description,
                            std::int64_t age_limit_ns, std::uint32_t replicas) {
    kvConfig config;
    kvConfig_Init(&config);
    config.Bucket = bucket.c_str();
    config.Description = description.c_str();
    config.History = 1;
    config.TTL = age_limit_ns;
    config.StorageType = js_FileStorage;
    config.Replicas = static_cast<int>(replicas);
    kvStore* kv = nullptr;
    // Creating a bucket that exists with the same settings opens it.
    const natsStatus created = js_CreateKeyValue(&kv, js, &config);
    if (created == NATS_OK) return KvStoreHandle(kv);
    // Made by another version of these settings (another lease time): use it as it is.
    check(js_KeyValue(&kv, js, bucket.c_str()), fmt::format("key-value bucket {}", bucket));
    return KvStoreHandle(kv);
}

}  // namespace

void ensure_feed_stream(jsCtx* js, const ClusterLayout& layout) {
    const std::string description = feed_description(layout);
    jsStreamInfo* info = nullptr;
    jsErrCode code = static_cast<jsErrCode>(0);
    const natsStatus found =
        js_GetStreamInfo(&info, js, layout.feed_stream.c_str(), nullptr, &code);
    if (found == NATS_OK) {
        const std::string existing =
            info->Config->Description ? info->Config->Description : std::string();
        jsStreamInfo_Destroy(info);
        if (existing != description) {
            throw LayoutMismatch(fmt::format(
                "stream {} exists as \"{}\", not \"{}\": every sender and engine must use the "
                "partition count (and subject scheme) the stream was made with",
                layout.feed_stream, existing, description));
        }
        return;
    }
    if (found != NATS_NOT_FOUND && code != JSStreamNotFoundErr)
        check(found, fmt::format("stream {}", layout.feed_stream));
    jsStreamConfig config;
    jsStreamConfig_Init(&config);
    config.Name = layout.feed_stream.c_str();
    config.Description = description.c_str();
    const std::string subjects = feed_subjects(layout);
    const char* subject_list[] = {subjects.c_str()};
    config.Subjects = subject_list;
    config.SubjectsLen = 1;
    config.Storage = js_FileStorage;
    config.Replicas = layout.replicas;
    config.Duplicates =
        std::chrono::duration_cast<std::chrono::milliseconds>(kDuplicateWindow).count() *
        kNanosPerMilli;
    // No age limit: a live match's messages must all stay (a take-over rebuilds it from them);
    // a retired match's are purged by its engine (feed_purge_log.hpp).
    jsStreamInfo* created = nullptr;
    code = static_cast<jsErrCode>(0);
    const natsStatus status = js_AddStream(&created, js, &config, nullptr, &code);
    jsStreamInfo_Destroy(created);
    if (status == NATS_OK) return;
    // Another process made it in between: check that one instead.
    if (code == JSStreamNameExistErr) return ensure_feed_stream(js, layout);
    check(status, fmt::format("creating stream {}", layout.feed_stream));
}

KvStoreHandle ensure_latest_bucket(jsCtx* js, const ClusterLayout& layout) {
    return ensure_bucket(js, layout.latest_bucket, "liveprob: latest update of each match",
                         static_cast<std::int64_t>(layout.keep_s) * 1000 * kNanosPerMilli,
                         layout.replicas);
}

KvStoreHandle ensure_retired_bucket(jsCtx* js, const ClusterLayout& layout) {
    return ensure_bucket(js, layout.retired_bucket, "liveprob: final update of each retired match",
                         static_cast<std::int64_t>(layout.keep_s) * 1000 * kNanosPerMilli,
                         layout.replicas);
}

KvStoreHandle ensure_lease_bucket(jsCtx* js, const ClusterLayout& layout,
                                  std::chrono::milliseconds lease_time) {
    return ensure_bucket(js, layout.lease_bucket, "liveprob: partition leases",
                         lease_time.count() * kNanosPerMilli, layout.replicas);
}

}  // namespace liveprob::cluster
