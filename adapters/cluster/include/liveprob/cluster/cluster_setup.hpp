// Creates what the cluster mode needs in JetStream when it is missing, and checks it when it is
// there: the feed stream (replicated, a duplicate window, the partition count recorded in its
// description), the buckets of latest states, of retired matches' final states and of leases. Every
// process (send and each engine) calls it at start, so no separate set-up step is needed; a stream
// made with another partition count is refused with a clear error rather than silently mis-routed.
#pragma once

#include <chrono>
#include <cstdint>

#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/cluster/nats_client.hpp"

namespace liveprob::cluster {

// Resends within this window are dropped by the stream (message ids); later ones by the fold.
inline constexpr std::chrono::minutes kDuplicateWindow{2};

// The feed stream exists with another partition count: never to be used as it is.
struct LayoutMismatch : NatsError {
    using NatsError::NatsError;
};

// Throws LayoutMismatch, or NatsError when the cluster does not answer (no quorum).
void ensure_feed_stream(jsCtx* js, const ClusterLayout& layout);
// Entries of these two age out `layout.keep_s` after they were last written.
KvStoreHandle ensure_latest_bucket(jsCtx* js, const ClusterLayout& layout);
KvStoreHandle ensure_retired_bucket(jsCtx* js, const ClusterLayout& layout);
// `lease_time`: a lease not renewed for this long expires (the bucket's age limit).
KvStoreHandle ensure_lease_bucket(jsCtx* js, const ClusterLayout& layout,
                                  std::chrono::milliseconds lease_time);

}  // namespace liveprob::cluster
