// A ZeroMQ socket driven by a Boost.Asio io_context. ZeroMQ exposes one file descriptor per
// socket (ZMQ_FD) that signals "the socket's state may have changed", edge-triggered; the truth
// is ZMQ_EVENTS. So: before every wait, look at ZMQ_EVENTS; while it says POLLIN, let the owner
// drain; only then wait on the descriptor again. The check and the wait happen in one handler on
// the loop's single thread, so a signal that arrives in between is still pending in the kernel
// when the reactor next polls and no wake-up is lost.
#pragma once

#include <boost/asio/io_context.hpp>
#include <boost/asio/posix/stream_descriptor.hpp>
#include <zmq.hpp>

#include <cstddef>
#include <functional>

namespace liveprob::transport {

class ReactorSocket {
public:
    // `drain` reads what it wants (non-blocking) and returns; it may stop early (after a batch)
    // to keep the loop fair: the socket is re-checked and drained again on the next turn.
    using DrainFunction = std::function<void(zmq::socket_t&)>;

    ReactorSocket(boost::asio::io_context& io, zmq::socket_t socket);
    ~ReactorSocket();
    ReactorSocket(const ReactorSocket&) = delete;
    ReactorSocket& operator=(const ReactorSocket&) = delete;

    zmq::socket_t& socket() noexcept { return socket_; }

    void start(DrainFunction drain);
    // Stops waiting and hands the descriptor back to ZeroMQ (Asio must never close it).
    void stop();
    // Call after using the socket outside `drain` (a send there can swallow the descriptor's
    // edge, and the wait would then sleep on messages already queued): drains what is waiting.
    void recheck();

private:
    void wait_or_drain();

    boost::asio::io_context& io_;
    zmq::socket_t socket_;
    boost::asio::posix::stream_descriptor descriptor_;
    DrainFunction drain_;
    bool running_ = false;
};

}  // namespace liveprob::transport
