"""liveprob.replay and liveprob.read_report: replaying the invented league's streams in process
equals `liveprob replay` (its report.json, read back with read_report)."""
import subprocess

import numpy
import pandas  # Debian's python3-pandas (tools/setup/install-deps.sh)
import pytest

import liveprob


@pytest.fixture(scope="module")
def some_streams(demo_streams):
    league = sorted((demo_streams / "league").iterdir())[:24]
    return league + [demo_streams / "cup"]


def test_replay_equals_the_programs_report(liveprob_binary, some_streams, tmp_path):
    r = liveprob.replay(some_streams, threads=2)
    assert len(r) == 24 + len(list(some_streams[-1].iterdir()))
    assert r.bad_records == 0
    assert r.forecasts.shape == (len(r), len(r.bucket_minute), len(r.forecaster), 3)
    kickoff = r.forecasts[:, 0, 0, :]
    assert numpy.allclose(kickoff.sum(axis=1), 1.0, atol=1e-12)

    report_dir = tmp_path / "report"
    subprocess.run([liveprob_binary, "replay", *map(str, some_streams), "--report",
                    str(report_dir), "--quiet", "--threads", "1"], check=True,
                   stdout=subprocess.DEVNULL)
    report = liveprob.read_report(report_dir)
    assert report.matches["total"] == len(r)
    assert report.forecasters == r.forecaster
    mine = r.per_bucket(frame=False)
    theirs = report.scores(frame=False)
    assert list(mine["label"]) == theirs["label"]
    assert list(mine["forecaster"]) == theirs["forecaster"]
    assert list(mine["n"]) == theirs["n"]
    assert numpy.allclose(mine["brier"], theirs["brier"], rtol=0, atol=1e-12)
    assert numpy.allclose(mine["rps"], theirs["rps"], rtol=0, atol=1e-12)
    assert numpy.allclose(mine["log_loss"], theirs["log_loss"], rtol=0, atol=1e-12)


def test_per_match_rows_and_pandas_frames(some_streams):
    r = liveprob.replay(some_streams[:5])
    rows = r.per_match(frame=False)
    assert set(rows["fate"]) == {"scored"}
    for h, a, result in zip(rows["home_goals"], rows["away_goals"], rows["result"]):
        assert result == ("home" if h > a else "away" if a > h else "draw")
    frame = r.per_match()
    assert isinstance(frame, pandas.DataFrame) and len(frame) == 5
    buckets = r.per_bucket()
    assert list(buckets.columns) == ["minute", "label", "forecaster", "n", "brier", "log_loss",
                                     "rps"]


def test_bad_input_is_a_clear_error(tmp_path):
    with pytest.raises(FileNotFoundError):
        liveprob.replay(tmp_path / "missing.stream")
    not_report = tmp_path / "report.json"
    not_report.write_text('{"kind": "something else", "version": 1}')
    with pytest.raises(ValueError, match="not a liveprob replay report"):
        liveprob.read_report(tmp_path)
