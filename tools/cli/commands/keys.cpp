// `liveprob keys`: writes a CURVE key pair (<name>.public, <name>.secret) for serve or a feed.
#include <iostream>

#include "command_registry.hpp"
#include "liveprob/transport/curve_keys.hpp"

namespace liveprob::cli {
namespace {

const Registration registration{{
    "keys",
    "write a CURVE key pair (<name>.public and <name>.secret) for serve, a feed or a subscriber",
    [](CLI::App& sub) -> std::function<int()> {
        auto directory = std::make_shared<std::string>(".");
        auto name = std::make_shared<std::string>();
        sub.add_option("--dir", *directory, "directory to write into")
            ->check(CLI::ExistingDirectory);
        sub.add_option("--name", *name, "base name of the two files")->required();
        return [directory, name] {
            if (name->empty() || name->find('/') != std::string::npos) {
                throw UsageError("--name must be a plain file name");
            }
            const auto pair = transport::generate_curve_key_pair();
            transport::write_key_pair(pair, *directory, *name);
            std::cout << pair.public_z85 << "\n";
            return kExitOk;
        };
    },
}};

}  // namespace
}  // namespace liveprob::cli
