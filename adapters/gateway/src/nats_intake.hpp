// Private to the gateway: updates taken from a NATS cluster (the cluster mode, docs/cluster.md)
// instead of serve's PUB socket. A subscription on every match subject hands each update's bytes
// to the gateway's loop (posted to its io_context: the client's threads never touch the hub);
// at start the latest-state bucket is read once, so matches already under way are known before
// their next update (the hub skips an entry older than what it holds).
#pragma once

#include "liveprob/transport/asio_warnings.hpp"

#include <boost/asio/io_context.hpp>

#include <cstdint>
#include <functional>
#include <string>
#include <vector>

#include "liveprob/cluster/cluster_layout.hpp"
#include "liveprob/cluster/nats_client.hpp"

namespace liveprob::gateway {

class NatsIntake {
public:
    using Take = std::function<void(const std::vector<std::uint8_t>& payload)>;

    // Connects (throws cluster::NatsError when no server answers) and subscribes.
    NatsIntake(const std::vector<std::string>& servers, boost::asio::io_context& io, Take take);
    ~NatsIntake();
    NatsIntake(const NatsIntake&) = delete;
    NatsIntake& operator=(const NatsIntake&) = delete;

    // Hands every entry of the latest-state bucket to the loop; the number handed (0 when the
    // bucket does not exist yet: no engine has run).
    std::size_t read_latest_states();
    // The connection is up (the client reconnects for ever while it is not).
    bool connected() const;
    void stop();

private:
    static void on_message(natsConnection*, natsSubscription*, natsMsg* message, void* closure);
    void hand_over(const void* data, int length);

    boost::asio::io_context& io_;
    Take take_;
    cluster::ClusterLayout layout_;
    cluster::NatsClient client_;
    cluster::SubscriptionHandle subscription_;
};

}  // namespace liveprob::gateway
