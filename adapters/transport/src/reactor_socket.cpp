#include "liveprob/transport/reactor_socket.hpp"

#include <boost/asio/post.hpp>

namespace liveprob::transport {

ReactorSocket::ReactorSocket(boost::asio::io_context& io, zmq::socket_t socket)
    : io_(io), socket_(std::move(socket)), descriptor_(io, socket_.get(zmq::sockopt::fd)) {}

ReactorSocket::~ReactorSocket() { stop(); }

void ReactorSocket::start(DrainFunction drain) {
    drain_ = std::move(drain);
    running_ = true;
    // Start from a posted handler so the owner can finish setting up before the first drain.
    boost::asio::post(io_, [this] { wait_or_drain(); });
}

void ReactorSocket::stop() {
    running_ = false;
    if (descriptor_.is_open()) {
        boost::system::error_code ignored;
        descriptor_.cancel(ignored);
        descriptor_.release();  // the descriptor belongs to ZeroMQ
    }
}

void ReactorSocket::recheck() {
    if (!running_) return;
    boost::asio::post(io_, [this] {
        if (!running_ || (socket_.get(zmq::sockopt::events) & ZMQ_POLLIN) == 0) return;
        drain_(socket_);
        recheck();  // more than one batch: again on the next turn
    });
}

void ReactorSocket::wait_or_drain() {
    while (running_ && (socket_.get(zmq::sockopt::events) & ZMQ_POLLIN) != 0) {
        drain_(socket_);
        if (!running_) return;
        if ((socket_.get(zmq::sockopt::events) & ZMQ_POLLIN) != 0) {
            // More is waiting (the drain stopped after a batch): give other handlers a turn.
            boost::asio::post(io_, [this] { wait_or_drain(); });
            return;
        }
    }
    if (!running_) return;
    descriptor_.async_wait(boost::asio::posix::stream_descriptor::wait_read,
                           [this](const boost::system::error_code& ec) {
                               if (ec || !running_) return;
                               wait_or_drain();
                           });
}

}  // namespace liveprob::transport
