// The service's ZAP handler (ZeroMQ's authentication protocol, RFC 27): a REP socket on
// inproc://zeromq.zap.01 in the service's own context, answered on the event loop. libzmq asks
// it about every CURVE handshake; a refused peer never gets a message through, so nothing from
// an unlisted key reaches the decoder, the journal or the engine.
//
// Policy by ZAP domain (set on each server socket): "ingest" accepts only keys on the
// allow-list; "publish" accepts any key (CURVE there gives encryption, not access control).
#pragma once

#include <cstdint>
#include <set>
#include <string>

#include "liveprob/transport/curve_keys.hpp"
#include "liveprob/transport/reactor_socket.hpp"

namespace liveprob::transport {

inline constexpr const char* kIngestZapDomain = "ingest";
inline constexpr const char* kPublishZapDomain = "publish";

class ZapAuthenticator {
public:
    // Binds the ZAP endpoint; must exist before any CURVE server socket binds.
    ZapAuthenticator(boost::asio::io_context& io, zmq::context_t& context,
                     std::set<RawKey> allowed_feeds);

    void start();
    void stop() { socket_.stop(); }
    // Replaces the allow-list (serve's SIGHUP). It rules the next handshakes; a feed already
    // connected stays connected.
    void allow(std::set<RawKey> allowed_feeds) { allowed_feeds_ = std::move(allowed_feeds); }

    std::uint64_t accepted() const noexcept { return accepted_; }
    std::uint64_t refused() const noexcept { return refused_; }

private:
    void answer(zmq::socket_t& socket);

    ReactorSocket socket_;
    std::set<RawKey> allowed_feeds_;
    std::uint64_t accepted_ = 0;
    std::uint64_t refused_ = 0;
};

}  // namespace liveprob::transport
