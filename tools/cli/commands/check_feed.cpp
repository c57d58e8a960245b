// `liveprob check-feed FILE`: validates a feed file (JSON lines, a size-prefixed binary stream,
// or a journal segment, told apart by content; a folder is a journal, its segments checked in
// order) and reports every bad line on stderr. With --mapping RULES the file is a provider's
// JSON lines, each mapped by the rules and then checked.
// Exit 0 when every line is good, 1 when any is bad or the file cannot be read.
#include <fmt/format.h>

#include <filesystem>
#include <iostream>
#include <memory>
#include <optional>

#include "command_registry.hpp"
#include "liveprob/protocol/feed_check.hpp"
#include "liveprob/protocol/feed_mapping.hpp"
#include "liveprob/protocol/journal_format.hpp"
#include "liveprob/protocol/whole_file.hpp"

namespace {

namespace lp = liveprob::protocol;

struct CheckFeedOptions {
    std::string path;
    std::string mapping;  // a provider's rules file, or "" for the native forms
    bool json = false;
};

void print_summary(const std::string& path, const lp::FeedCheckSummary& s) {
    const char* form = s.form == lp::FeedForm::json_lines     ? "JSON lines"
                       : s.form == lp::FeedForm::frame_stream ? "size-prefixed stream"
                                                              : "journal";
    const char* units = s.form == lp::FeedForm::json_lines     ? "lines"
                        : s.form == lp::FeedForm::frame_stream ? "frames"
                                                               : "records";
    fmt::print("{}: {}, {} {}: {} ok, {} skipped, {} bad\n", path, form, s.units, units, s.ok,
               s.skipped, s.bad);
    for (const auto& [kind, count] : s.kinds) fmt::print("  {:<17} {}\n", kind, count);
    if (s.repeated_seq + s.out_of_order_seq > 0) {
        fmt::print(
            "  note: {} repeated and {} out-of-order sequence numbers (the engine "
            "de-duplicates and re-orders them)\n",
            s.repeated_seq, s.out_of_order_seq);
    }
}

// A journal folder: every segment checked, problems named by segment, the totals summed.
lp::FeedCheckSummary check_journal_folder(const std::filesystem::path& folder) {
    lp::FeedCheckSummary total;
    total.form = lp::FeedForm::journal;
    for (const auto& segment : lp::list_journal_segments(folder)) {
        const std::string name = segment.filename().string();
        const auto bytes = lp::read_whole_file_bytes(segment, "the journal segment");
        const auto kind = lp::classify_journal_file(bytes);
        if (kind != lp::JournalFileKind::segment) {
            if (kind == lp::JournalFileKind::empty) continue;
            ++total.units;
            ++total.bad;
            std::cerr << name << ": " << lp::describe_journal_file_kind(kind) << "\n";
            continue;
        }
        const auto one = lp::check_feed(bytes, [&](const std::string& problem) {
            std::cerr << name << ": " << problem << "\n";
        });
        total.units += one.units;
        total.ok += one.ok;
        total.bad += one.bad;
        for (const auto& [kind_name, count] : one.kinds) total.kinds[kind_name] += count;
        total.repeated_seq += one.repeated_seq;
        total.out_of_order_seq += one.out_of_order_seq;
    }
    return total;
}

int run_check_feed(const CheckFeedOptions& options) {
    lp::FeedCheckSummary summary;
    if (std::filesystem::is_directory(options.path) && options.mapping.empty()) {
        summary = check_journal_folder(options.path);
    } else {
        const auto bytes =
            lp::read_whole_file_bytes(options.path, "the feed");  // throws: exit 1 with the reason
        const std::optional<lp::FeedMapping> mapping =
            options.mapping.empty() ? std::nullopt
                                    : std::optional(lp::FeedMapping::from_file(options.mapping));
        summary = lp::check_feed(
            bytes, [](const std::string& problem) { std::cerr << problem << "\n"; },
            mapping ? &*mapping : nullptr);
    }
    if (options.json) {
        fmt::print("{}\n", lp::summary_json(summary));
    } else {
        print_summary(options.path, summary);
    }
    return summary.all_good() ? liveprob::cli::kExitOk : liveprob::cli::kExitFailure;
}

const liveprob::cli::Registration registration{
    {"check-feed",
     "check a feed file (JSON lines, size-prefixed stream or journal) and report every bad "
     "line",
     [](CLI::App& app) {
         auto options = std::make_shared<CheckFeedOptions>();
         app.add_option("FILE", options->path, "the feed file to check")->required();
         app.add_flag("--json", options->json, "print the summary as one JSON object");
         app.add_option("--mapping", options->mapping,
                        "a provider's feed: map each line with this rules file first (a dry "
                        "run of `send --mapping`)");
         return [options] { return run_check_feed(*options); };
     }}};

}  // namespace
