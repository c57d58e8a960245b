#include "liveprob/demo/demo_league.hpp"

#include <algorithm>
#include <array>
#include <numeric>
#include <stdexcept>
#include <string_view>

#include "liveprob/demo/portable_random.hpp"

namespace liveprob::demo {

namespace {

// Invented towns and club words; syllables for invented player names.
constexpr std::array<std::string_view, 20> kTowns{
    "Harrowmere", "Quillby",     "Fenwyck Cross", "Ostrel Vale",   "Brindlecombe",
    "Marrowgate", "Tellhaven",   "Duskmoor",      "Pellingford",   "Castor Bay",
    "Wrenfield",  "Ashcarrow",   "Lowmere Reach", "Skelby",        "Orrin Falls",
    "Gallowmere", "Thistlewick", "Varnby",        "Kestrel Point", "Moorvane"};
constexpr std::array<std::string_view, 10> kClubWords{"Wanderers", "Athletic", "Town",   "Harriers",
                                                      "Albion",    "Rovers",   "Saints", "Mariners",
                                                      "Foresters", "Lanterns"};
constexpr std::array<std::string_view, 16> kGivenSyllables{
    "Al",  "Bre", "Cas", "Dar", "El",  "Fen", "Gil",  "Hal",
    "Ivo", "Jas", "Kel", "Lor", "Mar", "Nol", "Oren", "Tav"};
constexpr std::array<std::string_view, 8> kGivenEndings{"an", "ric", "o",  "ey",
                                                        "en", "is",  "us", "im"};
constexpr std::array<std::string_view, 16> kFamilyStarts{
    "Ash", "Bram", "Cold", "Dun", "Elm",   "Frost", "Grey", "Holl",
    "Ire", "Kil",  "Lang", "Mor", "North", "Pike",  "Quar", "Rook"};
constexpr std::array<std::string_view, 8> kFamilyEndings{"well", "by",   "ton",  "ridge",
                                                         "ley",  "more", "wick", "stead"};

template <std::size_t N>
std::string_view pick(const std::array<std::string_view, N>& words, PortableRandom& rng) {
    return words[static_cast<std::size_t>(rng.below(N))];
}

std::string invented_player(PortableRandom& rng) {
    std::string name;
    name += pick(kGivenSyllables, rng);
    name += pick(kGivenEndings, rng);
    name += ' ';
    name += pick(kFamilyStarts, rng);
    name += pick(kFamilyEndings, rng);
    return name;
}

}  // namespace

std::vector<Fixture> double_round_robin(int clubs) {
    if (clubs < 2 || clubs % 2 != 0)
        throw std::invalid_argument("double_round_robin: need an even number of clubs >= 2");
    // Circle method: club 0 stays, the others rotate one place per round.
    std::vector<int> ring(static_cast<std::size_t>(clubs));
    std::iota(ring.begin(), ring.end(), 0);
    const int rounds = clubs - 1;
    std::vector<Fixture> first_half;
    for (int round = 0; round < rounds; ++round) {
        for (int k = 0; k < clubs / 2; ++k) {
            int a = ring[static_cast<std::size_t>(k)];
            int b = ring[static_cast<std::size_t>(clubs - 1 - k)];
            // Alternate who is at home so no club stays home or away for long.
            if ((k == 0 && round % 2 == 1) || (k > 0 && (round + k) % 2 == 0)) std::swap(a, b);
            first_half.push_back({round + 1, a, b});
        }
        std::rotate(ring.begin() + 1, ring.end() - 1, ring.end());
    }
    std::vector<Fixture> season = first_half;
    for (const auto& f : first_half) season.push_back({f.round + rounds, f.away, f.home});
    return season;
}

DemoLeague make_demo_league(std::uint64_t seed, int clubs) {
    if (clubs < 2 || clubs > static_cast<int>(kTowns.size()) || clubs % 2 != 0) {
        throw std::invalid_argument("make_demo_league: clubs must be even, 2..20");
    }
    PortableRandom rng(seed);
    DemoLeague league;
    league.name = "Lantern Coast League";
    league.cup_name = "Lantern Coast Cup";
    for (int i = 0; i < clubs; ++i) {
        DemoClub club;
        club.town = std::string(kTowns[static_cast<std::size_t>(i)]);
        club.name = club.town + " " + std::string(pick(kClubWords, rng));
        for (int p = 0; p < 18; ++p) club.players.push_back(invented_player(rng));
        club.attack = rng.normal(0.0, 0.22);
        club.defence = rng.normal(0.0, 0.22);
        club.home_edge = rng.normal(0.22, 0.12);
        league.clubs.push_back(std::move(club));
    }
    league.season = double_round_robin(clubs);
    // The cup: 16 entrants (all clubs when fewer), drawn in random bracket order.
    std::vector<int> order(static_cast<std::size_t>(clubs));
    std::iota(order.begin(), order.end(), 0);
    for (std::size_t i = order.size(); i > 1; --i)
        std::swap(order[i - 1], order[static_cast<std::size_t>(rng.below(i))]);
    std::size_t entrants = 1;
    while (entrants * 2 <= order.size() && entrants * 2 <= 16) entrants *= 2;
    order.resize(entrants);
    league.cup_entrants = order;
    return league;
}

}  // namespace liveprob::demo
