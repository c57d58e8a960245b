#include "nats_cluster.hpp"

#include <arpa/inet.h>
#include <netinet/in.h>
#include <signal.h>
#include <sys/socket.h>
#include <unistd.h>

#include <algorithm>
#include <chrono>
#include <memory>
#include <stdexcept>
#include <thread>

#include <nats/nats.h>

namespace liveprob::test {
namespace {

using Clock = std::chrono::steady_clock;
constexpr auto kReadyLimit = std::chrono::seconds(20);
constexpr int kStartAttempts = 5;

// `count` distinct free loopback ports: each bound to port 0 at once (so the kernel hands out
// different ones), read back, released. Another program may take one before the server binds
// it; the caller then retries with fresh ports.
std::vector<std::uint16_t> free_ports(int count) {
    std::vector<int> sockets;
    std::vector<std::uint16_t> ports;
    for (int i = 0; i < count; ++i) {
        const int fd = ::socket(AF_INET, SOCK_STREAM, 0);
        if (fd < 0) throw std::runtime_error("socket() failed");
        sockets.push_back(fd);
        sockaddr_in address{};
        address.sin_family = AF_INET;
        address.sin_addr.s_addr = htonl(INADDR_LOOPBACK);
        address.sin_port = 0;
        socklen_t length = sizeof address;
        if (::bind(fd, reinterpret_cast<sockaddr*>(&address), sizeof address) != 0 ||
            ::getsockname(fd, reinterpret_cast<sockaddr*>(&address), &length) != 0) {
            for (int s : sockets) ::close(s);
            throw std::runtime_error("cannot draw a free port");
        }
        ports.push_back(ntohs(address.sin_port));
    }
    for (int s : sockets) ::close(s);
    return ports;
}

struct ConnectionCloser {
    void operator()(natsConnection* c) const { natsConnection_Destroy(c); }
};
struct ContextCloser {
    void operator()(jsCtx* js) const { jsCtx_Destroy(js); }
};
using Connection = std::unique_ptr<natsConnection, ConnectionCloser>;
using Context = std::unique_ptr<jsCtx, ContextCloser>;

// A connection to `urls` (comma-separated) that gives up quickly (a node still starting refuses
// it). The list goes in as separate servers: natsOptions_SetURL takes one URL only.
Connection connect(const std::string& urls) {
    std::vector<std::string> list;
    for (std::size_t from = 0; from <= urls.size();) {
        const auto comma = std::min(urls.find(',', from), urls.size());
        list.push_back(urls.substr(from, comma - from));
        from = comma + 1;
    }
    std::vector<const char*> servers;
    for (const auto& url : list) servers.push_back(url.c_str());
    natsOptions* options = nullptr;
    if (natsOptions_Create(&options) != NATS_OK) return nullptr;
    natsOptions_SetServers(options, servers.data(), static_cast<int>(servers.size()));
    natsOptions_SetTimeout(options, 1000);
    natsOptions_SetMaxReconnect(options, 0);
    natsConnection* raw = nullptr;
    const natsStatus status = natsConnection_Connect(&raw, options);
    natsOptions_Destroy(options);
    return status == NATS_OK ? Connection(raw) : nullptr;
}

Context jetstream(natsConnection* connection) {
    jsOptions options;
    jsOptions_Init(&options);
    options.Wait = 1000;
    jsCtx* raw = nullptr;
    if (natsConnection_JetStream(&raw, connection, &options) != NATS_OK) return nullptr;
    return Context(raw);
}

}  // namespace

NatsCluster::NatsCluster(const std::filesystem::path& dir, int nodes) : dir_(dir), nodes_(nodes) {
    // Unique per cluster, so two clusters that ever saw each other's routes would refuse them.
    cluster_name_ = "test-" + std::to_string(::getpid()) + "-" + dir.filename().string();
    for (int i = 0; i < nodes; ++i) nodes_[i].store = dir / ("node-" + std::to_string(i));
    for (int attempt = 1; attempt <= kStartAttempts; ++attempt) {
        if (start_all()) return;
        for (auto& node : nodes_) node.process.reset();
        for (auto& node : nodes_) std::filesystem::remove_all(node.store);
    }
    throw std::runtime_error("the NATS cluster did not start in " + std::to_string(kStartAttempts) +
                             " attempts (logs in " + dir.string() + ")");
}

NatsCluster::~NatsCluster() {
    for (auto& node : nodes_) {
        if (node.process) node.process->signal(SIGKILL);
    }
    for (auto& node : nodes_) node.process.reset();
}

std::string NatsCluster::url(int node) const {
    return "nats://127.0.0.1:" + std::to_string(nodes_.at(node).client_port);
}

std::string NatsCluster::urls() const {
    std::string all;
    for (int i = 0; i < size(); ++i) all += (i ? "," : "") + url(i);
    return all;
}

std::string NatsCluster::name(int node) const { return "node-" + std::to_string(node); }

int NatsCluster::node_named(const std::string& server_name) const {
    for (int i = 0; i < size(); ++i) {
        if (name(i) == server_name) return i;
    }
    return -1;
}

bool NatsCluster::start_all() {
    const auto ports = free_ports(2 * size());
    for (int i = 0; i < size(); ++i) {
        nodes_[i].client_port = ports[2 * i];
        nodes_[i].route_port = ports[2 * i + 1];
        std::filesystem::create_directories(nodes_[i].store);
    }
    for (int i = 0; i < size(); ++i) start(i);
    try {
        for (int i = 0; i < size(); ++i) wait_ready(i);
        wait_replicated_stream_possible();
        return true;
    } catch (const std::exception&) {
        return false;
    }
}

void NatsCluster::start(int node) {
    std::string routes;
    for (int i = 0; i < size(); ++i) {
        routes += (i ? "," : "") + std::string("nats://127.0.0.1:") +
                  std::to_string(nodes_[i].route_port);
    }
    Node& n = nodes_.at(node);
    const auto log = dir_ / (name(node) + "-run" + std::to_string(++starts_) + ".log");
    n.process = std::make_unique<ChildProcess>(
        std::vector<std::string>{LIVEPROB_NATS_SERVER_PATH, "--addr", "127.0.0.1", "--port",
                                 std::to_string(n.client_port), "--server_name", name(node),
                                 "--jetstream", "--store_dir", n.store.string(), "--cluster",
                                 "nats://127.0.0.1:" + std::to_string(n.route_port), "--routes",
                                 routes, "--cluster_name", cluster_name_},
        log);
}

// The node answers JetStream requests (it knows the cluster's metadata leader).
void NatsCluster::wait_ready(int node) const {
    const auto deadline = Clock::now() + kReadyLimit;
    while (Clock::now() < deadline) {
        if (!running(node)) throw std::runtime_error(name(node) + " exited while starting");
        if (auto connection = connect(url(node))) {
            if (auto js = jetstream(connection.get())) {
                jsAccountInfo* info = nullptr;
                if (js_GetAccountInfo(&info, js.get(), nullptr, nullptr) == NATS_OK) {
                    jsAccountInfo_Destroy(info);
                    return;
                }
            }
        }
        std::this_thread::sleep_for(std::chrono::milliseconds(50));
    }
    throw std::runtime_error(name(node) + " not ready in time");
}

// A stream with one replica per node can be placed: every node is a current peer.
void NatsCluster::wait_replicated_stream_possible() const {
    const auto deadline = Clock::now() + kReadyLimit;
    const std::string stream = "readiness_probe";
    const std::string subject = "readiness.probe";
    while (Clock::now() < deadline) {
        if (auto connection = connect(urls())) {
            if (auto js = jetstream(connection.get())) {
                jsStreamConfig config;
                jsStreamConfig_Init(&config);
                config.Name = stream.c_str();
                const char* subjects[] = {subject.c_str()};
                config.Subjects = subjects;
                config.SubjectsLen = 1;
                config.Storage = js_MemoryStorage;
                config.Replicas = size();
                if (js_AddStream(nullptr, js.get(), &config, nullptr, nullptr) == NATS_OK) {
                    js_DeleteStream(js.get(), stream.c_str(), nullptr, nullptr);
                    return;
                }
            }
        }
        std::this_thread::sleep_for(std::chrono::milliseconds(100));
    }
    throw std::runtime_error("no replicated stream could be placed in time");
}

void NatsCluster::kill(int node) {
    Node& n = nodes_.at(node);
    if (!n.process) return;
    n.process->signal(SIGKILL);
    n.process->wait(std::chrono::seconds(10));
}

void NatsCluster::restart(int node) {
    kill(node);
    start(node);
    wait_ready(node);
}

bool NatsCluster::running(int node) const {
    const Node& n = nodes_.at(node);
    return n.process && n.process->running();
}

}  // namespace liveprob::test
