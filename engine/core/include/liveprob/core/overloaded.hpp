// Visitor from lambdas for std::visit over MessageBody: overloaded{[](const Goal&) {...}, ...}.
#pragma once

namespace liveprob::core {

template <class... Fs>
struct overloaded : Fs... {
    using Fs::operator()...;
};
template <class... Fs>
overloaded(Fs...) -> overloaded<Fs...>;  // clang 14 (the fuzz build) needs the guide

}  // namespace liveprob::core
