#include "liveprob/transport/zap_authenticator.hpp"

#include <spdlog/spdlog.h>

#include <algorithm>
#include <array>
#include <cstring>
#include <vector>

namespace liveprob::transport {

namespace {

zmq::socket_t bind_zap(zmq::context_t& context) {
    zmq::socket_t socket(context, zmq::socket_type::rep);
    socket.set(zmq::sockopt::linger, 0);
    socket.bind("inproc://zeromq.zap.01");
    return socket;
}

std::string printable_key(const zmq::message_t& raw) {
    if (raw.size() != 32) return "(no key)";
    std::array<char, kZ85KeyLength + 1> text{};
    zmq_z85_encode(text.data(), raw.data<std::uint8_t>(), 32);
    return std::string(text.data(), kZ85KeyLength);
}

}  // namespace

ZapAuthenticator::ZapAuthenticator(boost::asio::io_context& io, zmq::context_t& context,
                                   std::set<RawKey> allowed_feeds)
    : socket_(io, bind_zap(context)), allowed_feeds_(std::move(allowed_feeds)) {}

void ZapAuthenticator::start() {
    socket_.start([this](zmq::socket_t& socket) { answer(socket); });
}

void ZapAuthenticator::answer(zmq::socket_t& socket) {
    // One request: version, request id, domain, address, identity, mechanism, credentials...
    std::vector<zmq::message_t> frames;
    for (;;) {
        zmq::message_t frame;
        if (!socket.recv(frame, zmq::recv_flags::dontwait)) {
            if (frames.empty()) return;  // nothing waiting after all
            break;
        }
        const bool more = frame.more();
        frames.push_back(std::move(frame));
        if (!more) break;
    }
    const auto text = [&](std::size_t i) {
        return i < frames.size() ? frames[i].to_string() : std::string();
    };
    bool allow = false;
    std::string why = "malformed request";
    if (frames.size() >= 6 && text(0) == "1.0") {
        const std::string domain = text(2);
        const std::string mechanism = text(5);
        if (mechanism != "CURVE" || frames.size() < 7 || frames[6].size() != 32) {
            why = "only CURVE is accepted";
        } else if (domain == kPublishZapDomain) {
            allow = true;
        } else if (domain == kIngestZapDomain) {
            RawKey key{};
            std::memcpy(key.data(), frames[6].data(), 32);
            allow = allowed_feeds_.count(key) > 0;
            why = "key not on the allow-list";
        } else {
            why = "unknown domain";
        }
        if (allow) ++accepted_;
        else ++refused_;
        if (!allow) {
            spdlog::warn("refused a {} connection from {} key {}: {}", domain, text(3),
                         printable_key(frames[6 < frames.size() ? 6 : 0]), why);
        }
    } else {
        ++refused_;
    }
    // Reply: version, request id, status code, status text, user id, metadata.
    const std::array<std::string, 6> reply = {
        "1.0", text(1), allow ? "200" : "400", allow ? "OK" : why, "", ""};
    for (std::size_t i = 0; i < reply.size(); ++i) {
        socket.send(zmq::buffer(reply[i]),
                    i + 1 < reply.size() ? zmq::send_flags::sndmore : zmq::send_flags::none);
    }
}

}  // namespace liveprob::transport
