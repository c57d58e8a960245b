#include "liveprob/cluster/feed_purge_log.hpp"

#include <fmt/format.h>

#include <string>

namespace liveprob::cluster {

void FeedPurgeLog::note(std::uint64_t match_id, std::size_t bytes) {
    Held& held = matches_[match_id];
    ++held.records;
    held.bytes += bytes;
}

service::LogCompaction FeedPurgeLog::compact(const std::function<bool(std::uint64_t)>& keep) {
    service::LogCompaction done;
    for (const auto& [id, held] : matches_) done.bytes_before += held.bytes;
    for (auto it = matches_.begin(); it != matches_.end();) {
        const Held held = it->second;
        if (keep(it->first)) {
            done.records_kept += held.records;
            ++it;
            continue;
        }
        const std::string subject = feed_subject(layout_, it->first);
        jsOptions options;
        jsOptions_Init(&options);
        options.Stream.Purge.Subject = subject.c_str();
        jsErrCode code = static_cast<jsErrCode>(0);
        const natsStatus status = js_PurgeStream(js_, layout_.feed_stream.c_str(), &options, &code);
        if (status != NATS_OK) {
            throw service::RecordLogError(
                fmt::format("purging {} from stream {}: {} ({})", subject, layout_.feed_stream,
                            natsStatus_GetText(status), static_cast<int>(code)));
        }
        done.records_dropped += held.records;
        it = matches_.erase(it);
    }
    for (const auto& [id, held] : matches_) done.bytes_after += held.bytes;
    return done;
}

}  // namespace liveprob::cluster
