// `liveprob convert`: a recorded stream or a journal from one form to another: size-prefixed
// frames, JSON lines, a journal folder. The input's form is told by its content (a folder is a
// journal), so this is also how a journal of the previous format (bare frames) becomes one
// `serve --journal` opens. A damaged record stops the
// conversion before anything is written, unless --skip-bad (then it is counted and left out).
#include <fmt/format.h>

#include <filesystem>
#include <iostream>
#include <memory>

#include "command_registry.hpp"
#include "liveprob/backtest/recorded_stream.hpp"

namespace liveprob::cli {
namespace {

struct ConvertOptions {
    std::string in, out, form;
    bool skip_bad = false;
};

int run_convert(const ConvertOptions& o) {
    backtest::StreamForm form{};
    try {
        form = backtest::parse_stream_form(o.form);
    } catch (const std::invalid_argument& e) {
        throw UsageError(e.what());
    }
    if (std::filesystem::exists(o.out) && std::filesystem::equivalent(o.in, o.out)) {
        throw UsageError("--out must not be the input file");
    }
    const auto contents = backtest::read_stream(o.in);
    if (contents.bad_records && !o.skip_bad) {
        std::cerr << fmt::format(
            "liveprob convert: {} bad record(s), nothing written (--skip-bad leaves them out); "
            "first: {}\n",
            contents.bad_records, contents.first_problem);
        return kExitFailure;
    }
    backtest::write_stream(o.out, contents.messages, form);
    std::cout << fmt::format("{} messages written to {} as {}{}\n", contents.messages.size(), o.out,
                             form == backtest::StreamForm::frames    ? "size-prefixed frames"
                             : form == backtest::StreamForm::journal ? "a journal folder"
                                                                     : "JSON lines",
                             contents.bad_records
                                 ? fmt::format(" ({} bad record(s) left out; first: {})",
                                               contents.bad_records, contents.first_problem)
                                 : "");
    return kExitOk;
}

const Registration registration{{
    "convert",
    "convert a recorded stream or journal between size-prefixed frames, JSON lines and a journal "
    "folder",
    [](CLI::App& sub) -> std::function<int()> {
        auto o = std::make_shared<ConvertOptions>();
        sub.add_option("input", o->in, "stream file (either form), journal folder or segment")
            ->required()
            ->check(CLI::ExistingPath);
        sub.add_option("--out", o->out, "file to write (a new folder for journal)")->required();
        sub.add_option("--form", o->form, "form to write: frames, json or journal")->required();
        sub.add_flag("--skip-bad", o->skip_bad,
                     "leave damaged records out (counted) instead of stopping");
        return [o] { return run_convert(*o); };
    },
}};

}  // namespace
}  // namespace liveprob::cli
