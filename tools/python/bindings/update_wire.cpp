// The compiled module's reading of published updates: a buffer off the feed or a snapshot
// reply, verified by the C++ decoder (Python's flatbuffers has no verifier) and given back in
// the one JSON form of an update (protocol/README.md), written by the same code as tap and the
// gateway. The subscriber (liveprob/subscribe.py) needs nothing else: no NumPy, no flatc output.
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <cstdint>
#include <span>
#include <stdexcept>
#include <string>
#include <utility>
#include <vector>

#include "liveprob/protocol/update_codec.hpp"
#include "liveprob/protocol/update_json.hpp"
#include "update_wire.hpp"

namespace py = pybind11;

namespace liveprob::python {

namespace {

std::span<const std::uint8_t> bytes_of(const py::bytes& buffer) {
    const std::string_view view(buffer);
    return {reinterpret_cast<const std::uint8_t*>(view.data()), view.size()};
}

// One Update buffer as JSON; ValueError with the decoder's one-line detail when it is damaged.
std::string update_json(const py::bytes& buffer, const std::string& source) {
    const auto decoded = protocol::decode_update(bytes_of(buffer));
    if (!decoded.ok()) throw py::value_error(decoded.detail);
    return protocol::update_json(*decoded.value, {.source = source, .gateway_receive_us = 0});
}

py::bytes snapshot_request(std::uint64_t match_id) {
    const auto bytes = protocol::encode_snapshot_request(match_id);
    return {reinterpret_cast<const char*>(bytes.data()), bytes.size()};
}

// (error, [update JSON, ...]) of one SnapshotReply buffer.
std::pair<std::string, std::vector<std::string>> snapshot_reply_json(const py::bytes& buffer) {
    const auto decoded = protocol::decode_snapshot_reply(bytes_of(buffer));
    if (!decoded.ok()) throw py::value_error(decoded.detail);
    std::vector<std::string> updates;
    updates.reserve(decoded.value->updates.size());
    for (const auto& u : decoded.value->updates)
        updates.push_back(
            protocol::update_json(u, {.source = "snapshot", .gateway_receive_us = 0}));
    return {decoded.value->error, std::move(updates)};
}

}  // namespace

void add_update_wire(py::module_& m) {
    m.def("update_json", &update_json, py::arg("buffer"), py::arg("source"));
    m.def("snapshot_request", &snapshot_request, py::arg("match_id"));
    m.def("snapshot_reply_json", &snapshot_reply_json, py::arg("buffer"));
}

}  // namespace liveprob::python
