"""Pictures (drift.plot and --plot): valid PNG and SVG files with the expected axes, readable
labels that do not overlap, and a clean refusal without matplotlib."""

import json
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


@pytest.fixture
def no_matplotlib(monkeypatch):
    """matplotlib hidden, as if the plot extra were not installed."""
    for name in [m for m in sys.modules if m == "matplotlib" or m.startswith("matplotlib.")]:
        monkeypatch.setitem(sys.modules, name, None)
    monkeypatch.setitem(sys.modules, "matplotlib", None)


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
                                                                           no_matplotlib):
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


def test_design_picture(default_design, tmp_path):
    from drift.render_design import design_document

    doc = design_document(default_design[2])
    # The conical reed's file lists its notes from the lowest up (Ab3 ... E5); the picture must
    # sort them by pitch, not keep the document's order, so give it the notes reversed.
    in_pitch_order = [s["note"] for s in doc["sensitivity"]]
    assert in_pitch_order[:3] == ["Ab3", "A3", "Bb3"] and in_pitch_order[-1] == "E5"
    doc["sensitivity"] = doc["sensitivity"][::-1]
    path = tmp_path / "design.png"
    figure = plot.design(doc)
    figure.savefig(path, format="png", dpi=plot.DPI)  # also lays out the text measured below
    width, height = png_size(path)
    assert 900 <= width <= 1600 and 500 <= height <= 1400
    per_k, per_rh, per_km, per_co2, climates = figure.axes
    panels = (per_k, per_rh, per_km, per_co2)
    assert [ax.get_xlabel().replace("\n", " ") for ax in panels] == [
        "per K of room temperature [cents]", "per 10 % of relative humidity [cents]",
        "per km of altitude [cents]", "per % of CO2 in the breath [cents]"]
    assert per_k.get_ylabel() == "note"
    assert [t.get_text() for t in per_k.get_yticklabels()] == in_pitch_order  # lowest at the bottom
    # One bar per note, in the same order, with the document's values.
    by_note = {s["note"]: s for s in doc["sensitivity"]}
    for ax, key in zip(panels, [k for k, _ in plot.SENSITIVITY_PANELS]):
        assert [bar.get_width() for bar in ax.patches] == pytest.approx([by_note[n][key] for n in in_pitch_order])
    # The played humidity sensitivity is next to nothing: its panel spans a cent, not the noise.
    low, high = per_rh.get_xlim()
    assert high - low >= 1.0 - 1e-9
    # The climates' mean offsets and worst notes, by name.
    assert [t.get_text() for t in climates.get_yticklabels()] == ["winter-church", "sunny-lawn"]
    assert [bar.get_width() for bar in climates.patches] == pytest.approx(
        [c["mean_offset_cents"] for c in doc["climates"]])
    assert climates.get_xlabel().startswith("offset from equal temperament")
    assert "[cents]" in climates.get_xlabel()
    assert overlapping(per_k.get_yticklabels()) == []
    assert overlapping(climates.get_yticklabels()) == []
    for ax in figure.axes:
        assert overlapping(ax.get_xticklabels()) == []
    assert overlapping([ax.xaxis.label for ax in panels]) == []


@pytest.fixture(scope="module")
def advised_picture(tmp_path_factory):
    """``drift advise`` of the test pipe twice (an ensemble of two) through the bundled summer
    evening with a short plan, as JSON, and its picture as SVG: (document, result, svg path)."""
    from conftest import TWO_HOLE_PIPE, write_file

    folder = tmp_path_factory.mktemp("advise_plot")
    pipe = write_file(folder, TWO_HOLE_PIPE, "pipe.toml")
    output, svg = folder / "gig.json", folder / "gig.svg"
    result = invoke("advise", pipe, pipe, "--climate", "hillside-evening", "--plan", "play:2,rest:2,play:2",
                    "--format", "json", "--output", output, "--plot", svg)
    return json.loads(output.read_text(encoding="utf-8")), result, svg


def test_advise_command_draws(advised_picture):
    doc, result, svg = advised_picture
    assert result.stdout == "" and result.stderr == ""
    text = svg.read_text(encoding="utf-8")
    assert text.lstrip().startswith("<?xml") and "<svg" in text
    for label in ("time since the start [min]", "mean drift [cents]", "widest gap", "air [°C]", "pipe 1", "pipe 2"):
        assert label in text
    assert list(svg.parent.glob(".*.tmp")) == []


def test_advise_picture(advised_picture, tmp_path):
    doc = advised_picture[0]
    path = tmp_path / "advise.png"
    figure = plot.advise(doc)
    figure.savefig(path, format="png", dpi=plot.DPI)  # also lays out the text measured below
    width, height = png_size(path)
    assert 700 <= width <= 1400 and 500 <= height <= 1000
    drift, gap, air = figure.axes[:3]
    assert drift.get_ylabel().startswith("mean drift [cents]")
    assert gap.get_ylabel().replace("\n", " ") == "widest gap [cents]"
    assert air.get_ylabel() == "air [°C]" and air.get_xlabel() == "time since the start [min]"
    low, high = air.get_xlim()  # the whole plan, play:2,rest:2,play:2, and a little room
    assert -0.2 < low < 0.0 and 6.0 < high < 6.2
    minutes = [m["minute"] for m in doc["moments"]]
    # Each instrument's mean drift at each moment, and the widest gap between them.
    for line, name in zip(drift.get_lines(), doc["instruments"]):
        assert line.get_label() == name and list(line.get_xdata()) == minutes
        assert list(line.get_ydata()) == [next(s["mean_drift_cents"] for s in m["instruments"]
                                                if s["instrument"] == name) for m in doc["moments"]]
    assert list(gap.get_lines()[0].get_ydata()) == [m["widest_gap_cents"] for m in doc["moments"]]
    legend = [t.get_text() for t in drift.get_legend().get_texts()]
    assert legend == ["resting", "pipe 1", "pipe 2"]
    # The rest is shaded on every panel, from minute 2 to 4.
    for ax in (drift, gap, air):
        (band,) = ax.patches
        extent = band.get_path().transformed(band.get_patch_transform()).get_extents()
        assert (extent.x0, extent.x1) == pytest.approx((2.0, 4.0))
    # The moments are named along the top, in text that does not collide.
    (top,) = drift.child_axes
    labels = top.get_xticklabels()
    assert [t.get_text() for t in labels] == [m["label"] for m in doc["moments"]]
    assert overlapping(labels) == []
    for ax in (drift, gap, air):
        assert overlapping(ax.get_yticklabels()) == []
    assert overlapping(air.get_xticklabels()) == []


def test_advise_picture_of_one_instrument_has_no_gap_panel(advised_picture):
    # The document of one pipe, its moments moved to a plan with a short warm-up and a long set
    # (play:5,rest:5,play:120), so that the first moments' names stand close together.
    doc = json.loads(json.dumps(advised_picture[0]))
    doc["instruments"] = doc["instruments"][:1]
    doc["plan"] = [{"state": "play", "minutes": 5.0}, {"state": "rest", "minutes": 5.0},
                   {"state": "play", "minutes": 120.0}]
    for m, minute in zip(doc["moments"], [0.0, 5.0, 10.0, 130.0], strict=True):
        m["instruments"], m["minute"] = m["instruments"][:1], minute
    figure = plot.advise(doc)
    drift, air = figure.axes[:2]
    assert drift.get_ylabel().startswith("mean drift") and air.get_ylabel() == "air [°C]"
    figure.canvas.draw()  # lays out the text measured here
    assert overlapping(drift.child_axes[0].get_xticklabels()) == []
    # A change of under 2 K is drawn on at least a 2 K scale, not magnified.
    low, high = air.get_ylim()
    assert high - low >= 2.0 - 1e-9


@pytest.fixture
def tube(write_toml):
    from test_design import TUBE_415

    return write_toml(TUBE_415.format(a4="415"), "tube.toml")


def test_design_command_draws(tube, tmp_path):
    path = tmp_path / "design.png"
    result = invoke("design", tube, "--climate", "tuning-room", "--plot", path)
    assert "in tune on average at" in result.stdout
    png_size(path)
    assert list(tmp_path.glob(".*.tmp")) == []


@pytest.mark.parametrize("command", ["design", "advise"])
def test_plot_may_not_name_an_input(two_hole_pipe, tmp_path, command):
    # An instrument file may have any name: one ending in .png passes the suffix check.
    source = tmp_path / "pipe.png"
    source.write_text(two_hole_pipe.read_text())
    before = source.read_bytes()
    extra = ["--climate", "hillside-evening"] if command == "advise" else []
    assert_refused(invoke(command, source, *extra, "--plot", source, code=None), f"output {source} is the input file")
    assert source.read_bytes() == before


def test_advise_plot_may_not_name_an_ensemble_members_instrument(two_hole_pipe, write_toml):
    member = two_hole_pipe.with_name("member.svg")
    member.write_text(two_hole_pipe.read_text())
    band = write_toml('name = "duo"\n[[member]]\ninstrument = "member.svg"\n', "duo.toml")
    result = invoke("advise", "--ensemble", band, "--climate", "hillside-evening", "--plot", member, code=None)
    assert_refused(result, f"output {member} is the input file")
    assert member.read_text() == two_hole_pipe.read_text()


@pytest.mark.parametrize("args", [["design"], ["advise", "side-blown-flute", "--climate", "hillside-evening"]])
def test_new_pictures_refuse_an_unknown_suffix_before_computing(args, tmp_path):
    assert_refused(invoke(*args, "--plot", tmp_path / "p.jpg", code=None), "--plot", "must end in .png or .svg")
    assert list(tmp_path.iterdir()) == []


@pytest.mark.parametrize("command, extra, shown", [
    ("design", [], "in tune on average at"),
    ("advise", ["--climate", "hillside-evening", "--plan", "play:1"], "Gig sheet: tube 415"),
])
def test_new_pictures_without_matplotlib(tube, tmp_path, no_matplotlib, command, extra, shown):
    path = tmp_path / "picture.svg"
    path.write_bytes(b"an older picture")
    result = invoke(command, tube, *extra, "--plot", path, code=2)
    assert shown in result.stdout  # the result is still shown
    assert result.stderr == "drift: error: --plot needs matplotlib, the plot extra: pip install '.[plot]'\n"
    assert path.read_bytes() == b"an older picture"
