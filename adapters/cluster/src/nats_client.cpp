#include "liveprob/cluster/nats_client.hpp"

#include <fmt/format.h>
#include <fmt/ranges.h>

namespace liveprob::cluster {

void check(natsStatus status, std::string_view what) {
    if (status == NATS_OK) return;
    const char* detail = nats_GetLastError(nullptr);
    throw NatsError(fmt::format("{}: {}{}", what, natsStatus_GetText(status),
                                detail && *detail ? fmt::format(" ({})", detail) : ""));
}

NatsClient::NatsClient(const std::vector<std::string>& servers, const NatsClientOptions& options) {
    if (servers.empty()) throw NatsError("no NATS server given");
    natsOptions* o = nullptr;
    check(natsOptions_Create(&o), "NATS options");
    std::unique_ptr<natsOptions, void (*)(natsOptions*)> owned(o, natsOptions_Destroy);
    std::vector<const char*> urls;
    for (const auto& s : servers) urls.push_back(s.c_str());
    check(natsOptions_SetServers(o, urls.data(), static_cast<int>(urls.size())), "NATS servers");
    if (!options.name.empty()) natsOptions_SetName(o, options.name.c_str());
    natsOptions_SetTimeout(o, options.connect_timeout_ms);
    natsOptions_SetMaxReconnect(o, -1);  // a lost node is not the end: try the others for ever
    natsOptions_SetReconnectWait(o, options.reconnect_wait_ms);
    check(natsConnection_Connect(&connection_, o),
          fmt::format("connecting to {}", fmt::join(servers, ",")));
    jsOptions js_options;
    jsOptions_Init(&js_options);
    js_options.Wait = options.request_timeout_ms;
    const natsStatus status = natsConnection_JetStream(&js_, connection_, &js_options);
    if (status != NATS_OK) {
        natsConnection_Destroy(connection_);
        check(status, "JetStream context");
    }
}

NatsClient::~NatsClient() {
    jsCtx_Destroy(js_);
    // Flushes what is still buffered (updates, latest states) before closing.
    natsConnection_FlushTimeout(connection_, 2000);
    natsConnection_Destroy(connection_);
}

std::string NatsClient::connected_url() const {
    char buffer[256] = {0};
    if (natsConnection_GetConnectedUrl(connection_, buffer, sizeof buffer) != NATS_OK) return {};
    return buffer;
}

}  // namespace liveprob::cluster
