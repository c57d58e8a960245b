// liveprob._native: the engine for Python (pybind11). Thin on purpose: plain values in, dicts of
// plain values and tables out; the Python package (tools/python/liveprob/) gives them names,
// docstrings and types, and turns each table into a NumPy array when NumPy is installed. Every call
// runs the same engine code as the program and the service: a position priced here equals `liveprob
// calc`, a replay equals `liveprob backtest`.
#include <pybind11/pybind11.h>
#include <pybind11/stl.h>

#include <cmath>
#include <cstdint>
#include <optional>
#include <stdexcept>
#include <string>
#include <vector>

#include "liveprob/backtest/backtest.hpp"
#include "liveprob/backtest/recorded_stream.hpp"
#include "liveprob/core/match.hpp"
#include "liveprob/core/position.hpp"
#include "liveprob/files/params_file.hpp"
#include "liveprob/scoring/bucket_scores.hpp"
#include "update_wire.hpp"

namespace py = pybind11;
using namespace liveprob;

namespace {

// A dense row-major table of numbers that Python reads through the buffer protocol: NumPy wraps
// it without a copy (numpy.asarray), and without NumPy a memoryview gives its shape, t[i, j] and
// tolist(). NumPy's own array type would make NumPy a hard requirement at run time, and a plain
// virtual environment has no way to get it offline.
template <class T>
class Table {
public:
    explicit Table(std::vector<py::ssize_t> shape) : shape_(std::move(shape)) {
        std::size_t n = 1;
        for (const py::ssize_t extent : shape_) n *= static_cast<std::size_t>(extent);
        values_.assign(n, T{});
    }

    template <class... Index>
    T& at(Index... index) {
        static_assert(sizeof...(Index) > 0);
        const py::ssize_t indices[] = {static_cast<py::ssize_t>(index)...};
        std::size_t flat = 0;
        for (std::size_t k = 0; k < sizeof...(Index); ++k)
            flat =
                flat * static_cast<std::size_t>(shape_[k]) + static_cast<std::size_t>(indices[k]);
        return values_[flat];
    }

    py::buffer_info buffer() {
        std::vector<py::ssize_t> strides(shape_.size());
        py::ssize_t stride = sizeof(T);
        for (std::size_t k = shape_.size(); k-- > 0;) {
            strides[k] = stride;
            stride *= shape_[k];
        }
        return py::buffer_info(values_.data(), sizeof(T), py::format_descriptor<T>::format(),
                               static_cast<py::ssize_t>(shape_.size()), shape_, strides,
                               /*readonly=*/true);
    }

private:
    std::vector<py::ssize_t> shape_;
    std::vector<T> values_;
};

using Reals = Table<double>;
using Counts = Table<std::uint64_t>;
using Goals = Table<std::int32_t>;

template <class T>
void register_table(py::module_& m, const char* name) {
    py::class_<Table<T>>(m, name, py::buffer_protocol(), "a read-only table of numbers")
        .def_buffer(&Table<T>::buffer);
}

// The model's parameters: a parameter file's, or the built-in defaults, or with `plain_poisson`
// every state effect off and no strength updating (independent Poisson goals to come); then an
// explicit kappa.
core::ModelParams params_from(const std::optional<std::string>& params_file,
                              std::optional<double> kappa, bool plain_poisson) {
    if (plain_poisson && params_file)
        throw std::invalid_argument("give params_file or plain_poisson, not both");
    core::ModelParams p = params_file     ? files::load_params_file(*params_file)
                          : plain_poisson ? core::ModelParams::plain_poisson()
                                          : core::ModelParams{};
    if (kappa) p.kappa = *kappa;
    return p;
}

core::Period period_from(int period) {
    if (period < 0 || period > static_cast<int>(core::Period::finished))
        throw std::invalid_argument("period must be 0..6, got " + std::to_string(period));
    return static_cast<core::Period>(period);
}

core::Side side_from(const std::string& side) {
    if (side == "home") return core::Side::home;
    if (side == "away") return core::Side::away;
    throw std::invalid_argument("side must be 'home' or 'away', got '" + side + "'");
}

core::MatchClock clock_from(int period, std::int64_t clock_ms) {
    if (clock_ms < 0 || clock_ms > 200LL * 60'000)
        throw std::invalid_argument("clock_ms outside 0..200 minutes");
    return core::MatchClock{period_from(period), static_cast<std::uint32_t>(clock_ms)};
}

py::dict outputs_dict(const core::Outputs& o) {
    py::dict d;
    d["status"] = core::status_name(o.status);
    d["period"] = static_cast<int>(o.clock.period);
    d["clock_ms"] = o.clock.clock_ms;
    d["score"] = py::make_tuple(o.home_goals, o.away_goals);
    d["reds"] = py::make_tuple(o.home_reds, o.away_reds);
    d["home"] = o.p_home;
    d["draw"] = o.p_draw;
    d["away"] = o.p_away;
    d["has_advance"] = o.has_advance;
    d["advance_home"] = o.p_advance_home;
    d["advance_away"] = o.p_advance_away;
    d["expected_home_goals"] = o.expected_home_goals;
    d["expected_away_goals"] = o.expected_away_goals;
    d["next_goal_home"] = o.next_goal_home;
    d["next_goal_away"] = o.next_goal_away;
    d["next_goal_none"] = o.next_goal_none;
    Reals over({static_cast<py::ssize_t>(o.p_over.size())});
    for (std::size_t i = 0; i < o.p_over.size(); ++i) over.at(i) = o.p_over[i];
    d["over"] = std::move(over);
    d["both_score"] = o.p_both_score;
    Reals grid({core::kGrid, core::kGrid});
    for (int i = 0; i < core::kGrid; ++i)
        for (int j = 0; j < core::kGrid; ++j)
            grid.at(i, j) = o.goals_added[static_cast<std::size_t>(i)][static_cast<std::size_t>(j)];
    d["grid"] = std::move(grid);
    d["tail_mass"] = o.tail_mass;
    d["events_applied"] = o.events_applied;
    return d;
}

core::CompetitionFormat format_from(bool extra_time, bool shootout,
                                    std::optional<std::pair<int, int>> first_leg) {
    core::CompetitionFormat f;
    f.extra_time = extra_time;
    f.shootout = shootout;
    if (first_leg) {
        if (first_leg->first < 0 || first_leg->second < 0 || first_leg->first > 99 ||
            first_leg->second > 99)
            throw std::invalid_argument("first_leg goals must be 0..99");
        f.first_leg = core::FirstLegResult{static_cast<std::uint16_t>(first_leg->first),
                                           static_cast<std::uint16_t>(first_leg->second)};
    }
    return f;
}

py::dict price(double home_goals, double away_goals, int period, std::int64_t clock_ms,
               std::pair<int, int> score, std::pair<int, int> reds, std::optional<int> stoppage,
               bool extra_time, bool shootout, std::optional<std::string> params_file,
               std::optional<double> kappa, bool plain_poisson) {
    core::MatchPosition position;
    position.prior = core::PriorMeans{home_goals, away_goals};
    position.format = format_from(extra_time, shootout, std::nullopt);
    position.clock = clock_from(period, clock_ms);
    position.score = {score.first, score.second};
    position.reds = {reds.first, reds.second};
    position.stoppage_minutes = stoppage;
    const core::Match match =
        core::match_at(position, params_from(params_file, kappa, plain_poisson));
    return outputs_dict(match.outputs());
}

// One match driven event by event, with the sequence numbers the caller gives.
class PyMatch {
public:
    PyMatch(std::uint64_t match_id, double home_goals, double away_goals, bool extra_time,
            bool shootout, std::optional<std::pair<int, int>> first_leg,
            std::optional<std::string> params_file, std::optional<double> kappa, bool plain_poisson)
        : match_(match_id, setup_of(home_goals, away_goals, extra_time, shootout, first_leg),
                 params_from(params_file, kappa, plain_poisson)) {}

    // kind: the event's name; fields: its own values (see liveprob/match.py).
    py::tuple apply(const std::string& kind, std::uint64_t seq, int period, std::int64_t clock_ms,
                    const py::dict& fields) {
        core::InboundMessage m;
        m.header.match_id = match_.match_id();
        m.header.source_seq = seq;
        m.header.clock = clock_from(period, clock_ms);
        m.body = body_of(kind, fields);
        const core::ApplyResult r = match_.apply(m);
        return py::make_tuple(
            core::verdict_name(r.verdict),
            r.verdict == core::Verdict::rejected ? core::reject_reason_name(r.reason) : "");
    }

    bool advance(int period, std::int64_t clock_ms) {
        return match_.advance_to(clock_from(period, clock_ms));
    }

    py::dict outputs() const { return outputs_dict(match_.outputs()); }

private:
    static core::MatchSetup setup_of(double home_goals, double away_goals, bool extra_time,
                                     bool shootout, std::optional<std::pair<int, int>> first_leg) {
        core::MatchSetup s;
        s.prior = core::PriorMeans{home_goals, away_goals};
        s.format = format_from(extra_time, shootout, first_leg);
        return s;
    }

    template <class T>
    static T field(const py::dict& fields, const char* name, T fallback) {
        return fields.contains(name) ? fields[name].cast<T>() : fallback;
    }

    static core::MessageBody body_of(const std::string& kind, const py::dict& f) {
        const auto side = [&] { return side_from(field<std::string>(f, "side", "")); };
        const auto goals = [&](const char* name) {
            const int n = field<int>(f, name, 0);
            if (n < 0 || n > 99) throw std::invalid_argument(std::string(name) + " must be 0..99");
            return static_cast<std::uint16_t>(n);
        };
        if (kind == "period_start")
            return core::PeriodStart{period_from(field<int>(f, "period", 0))};
        if (kind == "period_end") return core::PeriodEnd{period_from(field<int>(f, "period", 0))};
        if (kind == "goal")
            return core::Goal{side(), field<bool>(f, "penalty", false),
                              field<bool>(f, "own_goal", false)};
        if (kind == "goal_cancelled")
            return core::GoalCancelled{field<std::uint64_t>(f, "goal_seq", 0)};
        if (kind == "red_card")
            return core::RedCard{side(), field<bool>(f, "second_yellow", false)};
        if (kind == "card_rescinded")
            return core::CardRescinded{field<std::uint64_t>(f, "card_seq", 0)};
        if (kind == "stoppage")
            return core::StoppageAnnounced{period_from(field<int>(f, "period", 0)),
                                           goals("minutes")};
        if (kind == "score_correction")
            return core::ScoreCorrection{goals("home_goals"), goals("away_goals")};
        if (kind == "shootout_kick")
            return core::ShootoutKick{side(), field<bool>(f, "scored", false)};
        if (kind == "shot_xg") return core::ShotXg{side(), field<double>(f, "xg", 0.0)};
        if (kind == "abandoned") return core::MatchAbandoned{};
        if (kind == "final_whistle") return core::FinalWhistle{};
        if (kind == "clock") return core::ClockSync{field<bool>(f, "running", true)};
        throw std::invalid_argument("unknown event kind '" + kind + "'");
    }

    core::Match match_;
};

// Recorded streams replayed in process (as `liveprob backtest`): per match, the forecasts of
// each forecaster at each bucket minute and the result; per bucket, the mean scores.
py::dict replay(const std::vector<std::string>& paths, unsigned threads,
                std::optional<std::string> params_file, std::optional<double> kappa,
                bool plain_poisson) {
    std::vector<core::InboundMessage> messages;
    std::uint64_t bad_records = 0;
    for (const auto& path : paths) {
        backtest::StreamContents contents = backtest::read_stream(path);
        bad_records += contents.bad_records;
        messages.insert(messages.end(), std::make_move_iterator(contents.messages.begin()),
                        std::make_move_iterator(contents.messages.end()));
    }
    backtest::BacktestOptions options;
    options.params = params_from(params_file, kappa, plain_poisson);
    options.threads = threads == 0 ? 1 : threads;
    std::vector<backtest::MatchReplay> replays;
    {
        py::gil_scoped_release unlocked;
        replays = backtest::replay_matches(backtest::group_by_match(messages), options);
    }
    const backtest::BacktestResult summed = backtest::sum_replays(replays, 0);

    const auto n = static_cast<py::ssize_t>(replays.size());
    constexpr int kF = backtest::kForecasters;
    constexpr int kB = scoring::kBuckets;
    Counts match_id({n}), n_messages({n}), rejected({n});
    Goals home_goals({n}), away_goals({n});
    std::vector<std::string> fate, result;
    Reals forecasts({n, kB, kF, 3});
    for (py::ssize_t m = 0; m < n; ++m) {
        const auto& r = replays[static_cast<std::size_t>(m)];
        match_id.at(m) = r.match_id;
        home_goals.at(m) = r.regulation_goals[0];
        away_goals.at(m) = r.regulation_goals[1];
        n_messages.at(m) = r.messages;
        rejected.at(m) = r.rejected;
        static const char* const fates[] = {"scored", "abandoned", "unfinished", "unusable"};
        fate.emplace_back(fates[static_cast<int>(r.fate)]);
        result.emplace_back(r.fate == backtest::ReplayFate::scored ? scoring::outcome_name(r.result)
                                                                   : "");
        for (int b = 0; b < kB; ++b)
            for (int f = 0; f < kF; ++f) {
                const auto& fc =
                    r.forecasts[static_cast<std::size_t>(b)][static_cast<std::size_t>(f)];
                for (int o = 0; o < 3; ++o)
                    forecasts.at(m, b, f, o) =
                        fc ? (*fc)[static_cast<std::size_t>(o)] : std::nan("");
            }
    }
    Goals bucket_minute({kB});
    std::vector<std::string> bucket_label, forecaster;
    Counts count({kB, kF});
    Reals brier({kB, kF}), log_loss({kB, kF}), rps({kB, kF});
    for (int b = 0; b < kB; ++b) {
        bucket_minute.at(b) = scoring::kBucketMinutes[static_cast<std::size_t>(b)];
        bucket_label.emplace_back(scoring::bucket_label(b));
        for (int f = 0; f < kF; ++f) {
            const auto& acc =
                summed.scores[static_cast<std::size_t>(b)][static_cast<std::size_t>(f)];
            count.at(b, f) = acc.count();
            brier.at(b, f) = acc.mean_brier();
            log_loss.at(b, f) = acc.mean_log_loss();
            rps.at(b, f) = acc.mean_rps();
        }
    }
    for (int f = 0; f < kF; ++f)
        forecaster.emplace_back(backtest::forecaster_name(static_cast<backtest::Forecaster>(f)));

    py::dict d;
    d["match_id"] = std::move(match_id);
    d["fate"] = std::move(fate);
    d["result"] = std::move(result);
    d["home_goals"] = std::move(home_goals);
    d["away_goals"] = std::move(away_goals);
    d["messages"] = std::move(n_messages);
    d["rejected"] = std::move(rejected);
    d["forecasts"] = std::move(forecasts);
    d["bucket_minute"] = std::move(bucket_minute);
    d["bucket_label"] = std::move(bucket_label);
    d["forecaster"] = std::move(forecaster);
    d["count"] = std::move(count);
    d["brier"] = std::move(brier);
    d["log_loss"] = std::move(log_loss);
    d["rps"] = std::move(rps);
    d["bad_records"] = bad_records;
    return d;
}

}  // namespace

PYBIND11_MODULE(_native, m) {
    m.doc() = "liveprob's engine, compiled (use the liveprob package, not this module)";
    register_table<double>(m, "Reals");
    register_table<std::uint64_t>(m, "Counts");
    register_table<std::int32_t>(m, "Goals");
    m.def("price", &price, py::arg("home_goals"), py::arg("away_goals"), py::arg("period"),
          py::arg("clock_ms"), py::arg("score"), py::arg("reds"), py::arg("stoppage"),
          py::arg("extra_time"), py::arg("shootout"), py::arg("params_file"), py::arg("kappa"),
          py::arg("plain_poisson"));
    py::class_<PyMatch>(m, "Match")
        .def(py::init<std::uint64_t, double, double, bool, bool, std::optional<std::pair<int, int>>,
                      std::optional<std::string>, std::optional<double>, bool>(),
             py::arg("match_id"), py::arg("home_goals"), py::arg("away_goals"),
             py::arg("extra_time"), py::arg("shootout"), py::arg("first_leg"),
             py::arg("params_file"), py::arg("kappa"), py::arg("plain_poisson"))
        .def("apply", &PyMatch::apply, py::arg("kind"), py::arg("seq"), py::arg("period"),
             py::arg("clock_ms"), py::arg("fields"))
        .def("advance", &PyMatch::advance, py::arg("period"), py::arg("clock_ms"))
        .def("outputs", &PyMatch::outputs);
    m.def("replay", &replay, py::arg("paths"), py::arg("threads"), py::arg("params_file"),
          py::arg("kappa"), py::arg("plain_poisson"));
    m.attr("GRID") = core::kGrid;
    liveprob::python::add_update_wire(m);
}
