#include "nats_intake.hpp"

#include <boost/asio/post.hpp>

namespace liveprob::gateway {

NatsIntake::NatsIntake(const std::vector<std::string>& servers, boost::asio::io_context& io,
                       Take take)
    : io_(io), take_(std::move(take)), client_(servers, {.name = "liveprob gateway"}) {
    natsSubscription* sub = nullptr;
    cluster::check(natsConnection_Subscribe(&sub, client_.connection(),
                                            (layout_.update_subject_prefix + ".*").c_str(),
                                            &NatsIntake::on_message, this),
                   "subscribing to the match subjects");
    subscription_.reset(sub);
    // The loop drains what is handed over; the client must not drop a burst meanwhile.
    natsSubscription_SetPendingLimits(sub, -1, -1);
    cluster::check(natsConnection_FlushTimeout(client_.connection(), 5000), "subscription");
}

NatsIntake::~NatsIntake() { stop(); }

void NatsIntake::stop() {
    if (subscription_) natsSubscription_Unsubscribe(subscription_.get());
}

void NatsIntake::on_message(natsConnection*, natsSubscription*, natsMsg* message, void* closure) {
    const cluster::MsgHandle owned(message);
    static_cast<NatsIntake*>(closure)->hand_over(natsMsg_GetData(message),
                                                 natsMsg_GetDataLength(message));
}

void NatsIntake::hand_over(const void* data, int length) {
    const auto* bytes = static_cast<const std::uint8_t*>(data);
    boost::asio::post(io_, [this, payload = std::vector<std::uint8_t>(bytes, bytes + length)] {
        take_(payload);
    });
}

std::size_t NatsIntake::read_latest_states() {
    kvStore* raw = nullptr;
    if (js_KeyValue(&raw, client_.jetstream(), layout_.latest_bucket.c_str()) != NATS_OK) return 0;
    const cluster::KvStoreHandle bucket(raw);
    kvKeysList keys{};
    if (kvStore_Keys(&keys, bucket.get(), nullptr) != NATS_OK) return 0;
    std::size_t handed = 0;
    for (int i = 0; i < keys.Count; ++i) {
        kvEntry* entry = nullptr;
        if (kvStore_Get(&entry, bucket.get(), keys.Keys[i]) != NATS_OK) continue;
        const cluster::KvEntryHandle owned(entry);
        hand_over(kvEntry_Value(entry), kvEntry_ValueLen(entry));
        ++handed;
    }
    kvKeysList_Destroy(&keys);
    return handed;
}

bool NatsIntake::connected() const {
    return natsConnection_Status(client_.connection()) == NATS_CONN_STATUS_CONNECTED;
}

}  // namespace liveprob::gateway
