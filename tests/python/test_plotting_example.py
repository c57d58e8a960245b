"""tools/examples/price_minute_by_minute.py runs and draws a real chart."""
import os
import subprocess
import sys

import matplotlib.image
import numpy

EXAMPLE = os.path.join(os.path.dirname(__file__), "..", "..", "tools", "examples",
                       "price_minute_by_minute.py")


def test_the_plotting_example_writes_a_chart(tmp_path):
    out = tmp_path / "timeline.png"
    run = subprocess.run([sys.executable, EXAMPLE, "--out", str(out)], check=True,
                         capture_output=True, text=True, env={**os.environ, "MPLBACKEND": "Agg",
                                                              "MPLCONFIGDIR": str(tmp_path)})
    assert "97 prices" in run.stdout
    data = out.read_bytes()
    assert data[:8] == b"\x89PNG\r\n\x1a\n" and len(data) > 20_000
    image = matplotlib.image.imread(str(out))
    assert image.shape[0] > 400 and image.shape[1] > 900
    # Non-trivial: many distinct colours (the three bands, lines, text), not a blank canvas.
    colours = numpy.unique((image[..., :3] * 255).astype(numpy.uint8).reshape(-1, 3), axis=0)
    assert len(colours) > 50
