// One connection to a NATS cluster and its JetStream context, owned (closed when it goes), and
// the owning handles of the C client's other objects. A failed call throws NatsError with the
// client's own explanation.
#pragma once

#include <nats/nats.h>

#include <memory>
#include <stdexcept>
#include <string>
#include <string_view>
#include <vector>

namespace liveprob::cluster {

struct NatsError : std::runtime_error {
    using std::runtime_error::runtime_error;
};

// Throws NatsError "<what>: <status text> (<the client's last error>)" unless `status` is OK.
void check(natsStatus status, std::string_view what);

struct MsgDeleter {
    void operator()(natsMsg* m) const noexcept { natsMsg_Destroy(m); }
};
struct SubscriptionDeleter {
    void operator()(natsSubscription* s) const noexcept { natsSubscription_Destroy(s); }
};
struct KvStoreDeleter {
    void operator()(kvStore* kv) const noexcept { kvStore_Destroy(kv); }
};
struct KvEntryDeleter {
    void operator()(kvEntry* e) const noexcept { kvEntry_Destroy(e); }
};
struct JsCtxDeleter {
    void operator()(jsCtx* js) const noexcept { jsCtx_Destroy(js); }
};
using MsgHandle = std::unique_ptr<natsMsg, MsgDeleter>;
using JsCtxHandle = std::unique_ptr<jsCtx, JsCtxDeleter>;
using SubscriptionHandle = std::unique_ptr<natsSubscription, SubscriptionDeleter>;
using KvStoreHandle = std::unique_ptr<kvStore, KvStoreDeleter>;
using KvEntryHandle = std::unique_ptr<kvEntry, KvEntryDeleter>;

struct NatsClientOptions {
    std::string name;               // shown by the servers' monitoring
    int connect_timeout_ms = 2000;  // per server tried
    int reconnect_wait_ms = 100;    // between reconnection attempts (it never stops trying)
    int request_timeout_ms = 5000;  // JetStream API requests
};

class NatsClient {
public:
    NatsClient(const std::vector<std::string>& servers, const NatsClientOptions& options = {});
    ~NatsClient();
    NatsClient(const NatsClient&) = delete;
    NatsClient& operator=(const NatsClient&) = delete;

    natsConnection* connection() const noexcept { return connection_; }
    jsCtx* jetstream() const noexcept { return js_; }
    // The server the connection is on now (empty while reconnecting).
    std::string connected_url() const;

private:
    natsConnection* connection_ = nullptr;
    jsCtx* js_ = nullptr;
};

}  // namespace liveprob::cluster
