#include <catch2/catch.hpp>

#include <set>
#include <string>

#include "liveprob/core/messages.hpp"

using namespace liveprob;

using namespace liveprob::core;

TEST_CASE("every message kind has a distinct stable name", "[messages]") {
    const MessageBody bodies[] = {
        MatchSetup{},      PeriodStart{},  PeriodEnd{},     Goal{},
        GoalCancelled{},   RedCard{},      CardRescinded{}, StoppageAnnounced{},
        ScoreCorrection{}, ShootoutKick{}, ShotXg{},        MatchAbandoned{},
        FinalWhistle{},    ClockSync{}};
    std::set<std::string> names;
    for (const auto& b : bodies) names.insert(kind_name(b));
    CHECK(names.size() == std::variant_size_v<MessageBody>);
    CHECK(std::string(kind_name(MessageBody{Goal{}})) == "goal");
}

TEST_CASE("sides and periods", "[messages]") {
    CHECK(other(Side::home) == Side::away);
    CHECK(other(Side::away) == Side::home);
    CHECK(std::string(period_name(Period::extra_second)) == "extra_second");
}
