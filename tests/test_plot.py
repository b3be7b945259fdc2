"""Pictures (drift.plot and --plot): valid PNG and SVG files with the expected axes, readable
labels that do not overlap, and a clean refusal without matplotlib."""

import struct
import sys

import numpy as np
import pytest

from conftest import assert_refused, invoke
from drift import plot

#: The first eight bytes of every PNG file (PNG specification, ISO/IEC 15948:2004, 5.2).
PNG_SIGNATURE = b"\x89PNG\r\n\x1a\n"


def png_size(path) -> tuple[int, int]:
    """Width and height [px] from the IHDR chunk that follows the signature (ISO/IEC 15948, 11.2.2)."""
    data = path.read_bytes()
    assert data[:8] == PNG_SIGNATURE and data[12:16] == b"IHDR"
    return struct.unpack(">II", data[16:24])


def overlapping(labels) -> list:
    """Pairs of drawn text labels whose boxes overlap."""
    boxes = [(t.get_text(), t.get_window_extent()) for t in labels if t.get_text()]
    return [(a, b) for i, (a, box) in enumerate(boxes) for b, other in boxes[i + 1:] if box.overlaps(other)]


def test_chart_picture(default_chart, tmp_path):
    path = tmp_path / "chart.png"
    figure = plot.chart(default_chart)
    figure.savefig(path, format="png", dpi=plot.DPI)  # also lays out the text measured below
    width, height = png_size(path)
    assert 700 <= width <= 1600 and 600 <= height <= 1400
    heat, below, bar = figure.axes
    assert heat.get_ylabel() == "note" and below.get_xlabel() == "climate"
    assert bar.get_ylabel().startswith("drift [cents]")
    notes = [t.get_text() for t in heat.get_yticklabels()]
    by_pitch = sorted(default_chart["reference_notes"], key=lambda r: r["frequency_hz"])
    assert notes == [r["note"] for r in by_pitch]  # lowest at the bottom (the first tick)
    assert [t.get_text() for t in below.get_xticklabels()] == default_chart["climates"]
    # The colour scale is centred on zero.
    low, high = heat.images[0].get_clim()
    assert low == -high
    assert overlapping(heat.get_yticklabels()) == []
    # The climate names are slanted, so their upright boxes overlap; the slanted lines of text
    # do not when the gap between neighbouring lines, tick spacing x sin(angle), exceeds the
    # height of a line.
    ticks = below.get_xticklabels()
    angle = np.radians(ticks[0].get_rotation())
    x = below.transData.transform([(j, 0.0) for j in range(len(ticks))])[:, 0]
    line_px = ticks[0].get_fontsize() * figure.dpi / 72.0
    assert np.min(np.diff(x)) * np.sin(angle) > line_px
    assert overlapping(below.get_yticklabels()) == []


def test_warmup_picture(pipe_warmup, tmp_path):
    path = tmp_path / "warmup.svg"
    plot.write_picture(plot.warmup, pipe_warmup.doc, path)
    svg = path.read_text(encoding="utf-8")
    assert svg.lstrip().startswith("<?xml") and "<svg" in svg
    assert "time since the start [min]" in svg
    assert "drift against design condition" in svg
    figure = plot.warmup(pipe_warmup.doc)
    (ax,) = figure.axes
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    assert labels[0] == "resting"
    assert set(pipe_warmup.doc["key_notes"]) <= set(labels)
    # The settle moment of each play phase that settles is marked.
    assert any(label.startswith("within 2 ¢ of steady") for label in labels) == any(
        s["settled_minute"] is not None for s in pipe_warmup.doc["settle"])


def test_chart_command_draws(two_hole_pipe, tmp_path):
    path = tmp_path / "chart.svg"
    result = invoke("chart", two_hole_pipe, "--climate", "tuning-room", "--plot", path)
    assert "Drift of pipe" in result.stdout
    assert "drift [cents]" in path.read_text(encoding="utf-8")
    assert list(tmp_path.glob(".*.tmp")) == []


def test_without_matplotlib_the_result_stands_and_the_picture_fails_cleanly(two_hole_pipe, tmp_path,
                                                                           monkeypatch):
    # Hide matplotlib as if the plot extra were not installed.
    for name in [m for m in sys.modules if m == "matplotlib" or m.startswith("matplotlib.")]:
        monkeypatch.setitem(sys.modules, name, None)
    monkeypatch.setitem(sys.modules, "matplotlib", None)
    path = tmp_path / "chart.png"
    path.write_bytes(b"an older picture")
    result = invoke("chart", two_hole_pipe, "--climate", "tuning-room", "--plot", path, code=2)
    assert "Drift of pipe" in result.stdout  # the table is still printed
    assert result.stderr == "drift: error: --plot needs matplotlib, the plot extra: pip install '.[plot]'\n"
    assert path.read_bytes() == b"an older picture"
    with pytest.raises(plot.PlotError, match=r"pip install '\.\[plot\]'"):
        plot.write_picture(plot.chart, {}, tmp_path / "x.png")


def test_unknown_picture_suffix_is_refused_before_computing(tmp_path):
    result = invoke("warmup", "--plot", tmp_path / "w.pdf", code=None)
    assert_refused(result, "--plot", "must end in .png or .svg")
    assert list(tmp_path.iterdir()) == []


def test_a_picture_that_fails_to_save_leaves_the_older_file(tmp_path):
    def broken(doc):
        figure = plot._figure(3.0, 2.0)
        figure.text(0.5, 0.5, r"$\notacommand$")  # mathtext that fails only when drawn
        return figure

    path = tmp_path / "p.png"
    path.write_bytes(b"an older picture")
    with pytest.raises(ValueError):
        plot.write_picture(broken, {}, path)
    assert path.read_bytes() == b"an older picture"
    assert list(tmp_path.iterdir()) == [path]
