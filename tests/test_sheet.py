"""The gig sheet (drift.sheet): the text that reads on a phone, and the guide's worked example,
which must be the program's real output."""

from pathlib import Path

from drift import sheet

GUIDE = Path(__file__).resolve().parent.parent / "docs" / "guide.md"
EXAMPLE = "drift advise side-blown-flute cylindrical-reed conical-reed --climate hillside-evening"


def standing(name, mean, joint, reachable=True, out=(), written=None, transposition=0):
    return {"instrument": name, "mean_drift_cents": mean, "adjust_mm": joint, "joint_reachable": reachable,
            "from_ensemble_cents": 0.0, "out_of_tolerance": list(out),
            "written_out_of_tolerance": list(out if written is None else written),
            "transposition_semitones": transposition, "spread_after_cents": 1.0,
            "warning": None, "has_joint": joint is not None}


def test_long_names_and_many_notes_stay_within_60_columns():
    long = "an-instrument-with-a-very-long-name-indeed"
    doc = {"instruments": [long, "flute"], "climate": "somewhere-with-a-long-name", "a4_hz": 442.0,
           "tolerance_cents": 5.0, "plan": [{"state": "play", "minutes": 10.0}],
           "moments": [{"minute": 0.0, "label": "start", "temperature_c": -12.5, "relative_humidity_pct": 100.0,
                        "sun_w_m2": 1100.0, "wind_m_s": 12.0, "widest_gap_cents": 123.4,
                        "widest_gap_between": [long, "flute"],
                        "instruments": [standing(long, -123.4, None, False, ["C#4", "D#4"] * 20),
                                        standing("flute", 0.0, -12.3)]}],
           "advice": ["word " * 40], "cautions": ["x " * 80 + "(common practice)"], "care_note": "y " * 50}
    text = sheet.gig_sheet(doc)
    assert max(len(line) for line in text.splitlines()) <= sheet.SHEET_WIDTH
    assert "—!" in text and "an-instrument-with-a-…" in text


def test_written_sheet_names_the_keys_and_the_written_notes():
    # The sheet's --written form (the names themselves: drift.scale.written_name, tests/test_scale.py)
    doc = {"instruments": ["a-long-named-horn-in-f", "flute"], "climate": "c", "a4_hz": 440.0,
           "tolerance_cents": 5.0, "plan": [{"state": "play", "minutes": 10.0}],
           "moments": [{"minute": 0.0, "label": "start", "temperature_c": 20.0, "relative_humidity_pct": 50.0,
                        "sun_w_m2": 0.0, "wind_m_s": 0.0, "widest_gap_cents": 1.0,
                        "widest_gap_between": ["a-long-named-horn-in-f", "flute"],
                        "instruments": [standing("a-long-named-horn-in-f", 1.0, 0.5, out=["F3", "Bb3"] * 8,
                                                 written=["C4", "F4"] * 8, transposition=7),
                                        standing("flute", 0.0, 0.0, out=["C4"])]}],
           "advice": [], "cautions": [], "care_note": None}
    text = sheet.gig_sheet(doc, written=True)
    assert max(len(line) for line in text.splitlines()) <= sheet.SHEET_WIDTH
    assert "Written notes: a-long-named-horn-in-f in F; flute as" in text
    assert "still out: C4, F4, C4" in text and "Bb3" not in text and "flute still out: C4" in text
    plain = sheet.gig_sheet(doc)
    assert "still out: F3, Bb3" in plain and "Written notes" not in plain


def test_guide_worked_example_is_the_real_output(cli):
    guide = GUIDE.read_text(encoding="utf-8")
    after = guide.split(EXAMPLE + "\n```\n\n```\n", 1)[1]
    shown = after.split("```", 1)[0]
    assert cli(*EXAMPLE.split()[1:]).stdout == shown
