"""Written note names in the documents of a transposing instrument.

Notes are named by their sounding pitch everywhere in drift. A transposing instrument's file
gives ``transposition_semitones`` (written minus sounding pitch, docs/formats.md);
:func:`add_written_notes` puts the written name beside every sounding one in a document (JSON
carries both), and :func:`written_table` turns a table function into one that shows the written
names. The name mapping itself is :func:`drift.scale.written_name`.
"""

from __future__ import annotations

from drift.scale import key_name, written_name

#: Keys holding one sounding note name, and the key of its written name beside it.
WRITTEN_KEYS = {"note": "written_note", "worst_note": "written_worst_note"}
#: Keys holding lists of sounding note names (shown written in tables; sounding in JSON).
NOTE_LIST_KEYS = ("key_notes", "out_of_tolerance")


def add_written_notes(doc, transposition_semitones: int):
    """A copy of ``doc`` with ``written_note`` after every ``note`` (``written_worst_note`` after
    every ``worst_note``) and the top-level ``transposition_semitones``.

    Parameters
    ----------
    doc : dict
        A document of :mod:`drift.render` or :mod:`drift.render_design` (sounding names).
    transposition_semitones : int
        Written minus sounding pitch [semitones] (0: written names equal sounding ones).
    """
    def walk(value):
        if isinstance(value, list):
            return [walk(v) for v in value]
        if not isinstance(value, dict):
            return value
        out = {}
        for key, item in value.items():
            out[key] = walk(item)
            if key in WRITTEN_KEYS:
                out[WRITTEN_KEYS[key]] = None if item is None else written_name(item, transposition_semitones)
        return out

    return {**walk(doc), "transposition_semitones": int(transposition_semitones)}


def as_written(doc: dict) -> dict:
    """A document of :func:`add_written_notes` with its written names in place of the sounding
    ones (for tables), and its instrument labelled with the key it is written for."""
    n = doc["transposition_semitones"]

    def name(sounding):
        return written_name(sounding, n)

    def walk(value):
        if isinstance(value, list):
            return [walk(v) for v in value]
        if not isinstance(value, dict):
            return value
        out = {key: walk(item) for key, item in value.items()}
        for key, written in WRITTEN_KEYS.items():
            if written in out:
                out[key] = out[written]
        for key in NOTE_LIST_KEYS:
            if isinstance(out.get(key), list):
                out[key] = [name(v) for v in value[key]]
        return out

    label = f"written notes, in {key_name(n)}" if n else "written notes = sounding notes"
    return {**walk(doc), "instrument": f"{doc['instrument']} ({label})"}


def written_table(table, written: bool = True):
    """The table function ``table`` (document -> text) showing written note names (``table``
    itself when ``written`` is false)."""
    if not written:
        return table

    def show(doc: dict) -> str:
        return table(as_written(doc))

    return show
