// A real NATS JetStream cluster for a test: three (or `nodes`) nats-server processes on loopback,
// each with its own store folder under the test's scratch folder and its own client and route
// ports, joined into one cluster. The constructor returns once every node answers JetStream
// requests and a stream with as many replicas as nodes can be placed; the destructor stops them
// all. Parallel-safe: ports are drawn from the kernel (bound to port 0) and a start that loses a
// port to another program is retried with fresh ones.
#pragma once

#include <cstdint>
#include <filesystem>
#include <memory>
#include <string>
#include <vector>

#include "child_process.hpp"

namespace liveprob::test {

class NatsCluster {
public:
    explicit NatsCluster(const std::filesystem::path& dir, int nodes = 3);
    ~NatsCluster();
    NatsCluster(const NatsCluster&) = delete;
    NatsCluster& operator=(const NatsCluster&) = delete;

    int size() const { return static_cast<int>(nodes_.size()); }
    // nats://127.0.0.1:<port> of one node, and all of them comma-separated (what a client that
    // should survive the loss of a node connects to).
    std::string url(int node) const;
    std::string urls() const;
    // The server name a node reports (stream and consumer leaders are named by it).
    std::string name(int node) const;
    // The index of the node called `server_name`, -1 if none.
    int node_named(const std::string& server_name) const;

    // SIGKILL, no goodbye: the node's store stays as the crash left it.
    void kill(int node);
    // Starts a killed node again on its ports and store, and waits until it answers.
    void restart(int node);
    bool running(int node) const;

private:
    struct Node {
        std::uint16_t client_port = 0;
        std::uint16_t route_port = 0;
        std::filesystem::path store;
        std::unique_ptr<ChildProcess> process;
    };
    bool start_all();
    void start(int node);
    void wait_ready(int node) const;
    void wait_replicated_stream_possible() const;

    std::filesystem::path dir_;
    std::string cluster_name_;
    std::vector<Node> nodes_;
    int starts_ = 0;  // numbers the log files, one per process started
};

}  // namespace liveprob::test
