"""liveprob.price: the outputs of one position, checked against the program's calculator and,
for the model's plain Poisson case, against SciPy's Skellam distribution."""
import json
import math
import subprocess

import numpy
import pytest
import scipy.stats

import liveprob


def test_price_returns_every_output_with_the_grid_as_an_array():
    p = liveprob.price(prior=(1.45, 1.05), minute=0, score=(0, 0))
    assert isinstance(p, liveprob.Prices)
    assert p.home + p.draw + p.away == pytest.approx(1.0, abs=1e-12)
    assert p.home > p.away  # the stronger prior side is the favourite
    assert isinstance(p.grid, numpy.ndarray) and p.grid.shape == (16, 16)
    assert p.grid.sum() + p.tail_mass == pytest.approx(1.0, abs=1e-9)
    assert p.next_goal_home + p.next_goal_away + p.next_goal_none == pytest.approx(1.0, abs=1e-12)
    assert p.over.shape == (6,) and all(numpy.diff(p.over) < 0)
    assert p.period == "first_half" and p.minute == 0.0 and p.score == (0, 0)
    assert p.final_score(0, 0) == p.grid[0, 0] == pytest.approx(p.next_goal_none)
    assert not p.has_advance


@pytest.mark.parametrize("minute,score,reds,knockout", [
    (0, (0, 0), (0, 0), False), (67.5, (1, 2), (0, 1), False), ("90+3", (2, 2), (0, 0), False),
    ("45+2", (0, 1), (1, 0), True), (100, (1, 1), (0, 0), True)])
def test_price_equals_the_programs_calculator(liveprob_binary, minute, score, reds, knockout):
    args = [liveprob_binary, "calc", "--prior", "1.6,1.1", "--minute", str(minute),
            "--score", f"{score[0]}-{score[1]}", "--reds", f"{reds[0]}-{reds[1]}", "--json"]
    if knockout:
        args += ["--format", "knockout"]
    calc = json.loads(subprocess.run(args, check=True, capture_output=True, text=True).stdout)
    p = liveprob.price(prior=(1.6, 1.1), minute=minute, score=score, reds=reds,
                       knockout=knockout)
    # Same engine, same position: the same figures to the last bit (JSON keeps 17 digits).
    assert (p.home, p.draw, p.away) == (calc["home"], calc["draw"], calc["away"])
    assert p.grid.tolist() == calc["goals_added"]
    assert p.has_advance == (calc["advance"] is not None)


def test_kickoff_result_equals_scipys_skellam_in_the_plain_poisson_case():
    # With every state effect off and no strength updating the goals to come are independent
    # Poisson, so home - away is Skellam: P(home) = P(D > 0), P(draw) = P(D = 0).
    # Reference: SciPy's scipy.stats.skellam (Debian's python3-scipy).
    for prior in [(1.45, 1.05), (2.3, 0.6), (0.8, 1.7)]:
        p = liveprob.price(prior=prior, minute=0, plain_poisson=True)
        # The whole regulation time is still to come: the means are the prior's.
        assert p.expected_home_goals == pytest.approx(prior[0], abs=1e-12)
        assert p.expected_away_goals == pytest.approx(prior[1], abs=1e-12)
        skellam = scipy.stats.skellam(prior[0], prior[1])
        assert p.home == pytest.approx(skellam.sf(0), abs=1e-12)
        assert p.draw == pytest.approx(skellam.pmf(0), abs=1e-12)
        assert p.away == pytest.approx(skellam.cdf(-1), abs=1e-12)


def test_an_impossible_position_is_a_clear_error():
    with pytest.raises(ValueError, match="minute"):
        liveprob.price(prior=(1.4, 1.1), minute=-3)
    with pytest.raises(ValueError):
        liveprob.price(prior=(-1.0, 1.1), minute=10)
    with pytest.raises(ValueError, match="names no end"):
        liveprob.price(prior=(1.4, 1.1), minute="30+2")


def test_clock_of_maps_minutes_to_periods():
    assert liveprob.clock_of(0) == (1, 0)
    assert liveprob.clock_of(44.5) == (1, 2670000)
    assert liveprob.clock_of("45+2") == (1, 2820000)
    assert liveprob.clock_of(45) == (2, 2700000)
    assert liveprob.clock_of("90+4") == (2, 5640000)
    assert liveprob.clock_of(100, knockout=True) == (3, 6000000)
    assert liveprob.clock_of(110, knockout=True) == (4, 6600000)
    assert math.isclose(liveprob.price((1.2, 1.2), minute=30).minute, 30.0)
