"""Ensembles: the players of a gig, each with an instrument and, if they rest at other times than
the rest, a plan of their own. An ensemble file (TOML, documented in docs/formats.md) lists them.
"""

from __future__ import annotations

from dataclasses import dataclass
from pathlib import Path

from drift.climate import Phase, parse_plan, plan_duration_s
from drift.errors import DriftError, InputFileError
from drift.files import Table, read_toml
from drift.instrument import Instrument, load_instrument

TOP_KEYS = ("name", "description", "plan", "member")
MEMBER_KEYS = ("instrument", "label", "plan")


@dataclass(frozen=True)
class Member:
    """One player: the instrument, a label for reports, and their own plan (None: the
    ensemble's)."""

    instrument: Instrument
    label: str
    plan: tuple[Phase, ...] | None = None


@dataclass(frozen=True)
class Ensemble:
    """A named ensemble: its members and its plan (None: the command's)."""

    name: str
    members: tuple[Member, ...]
    plan: tuple[Phase, ...] | None = None
    description: str = ""


def _plan(table: Table, key: str) -> tuple[Phase, ...] | None:
    text = table.string(key)
    if text is None:
        return None
    try:
        return parse_plan(text)
    except DriftError as error:
        table.fail(key, f"= '{text}': {error}")


def load_ensemble(path: str | Path) -> Ensemble:
    """An ensemble from its file. Each member's ``instrument`` is a bundled name, or a path,
    relative to the ensemble file's folder when not absolute.

    Raises
    ------
    drift.errors.InputFileError
        Naming the file, the member and the key, for any bad key or value; a member's own plan
        must last as long as the ensemble's plan when both are given. (Members of the same
        label are numbered in reports.)
    """
    path = Path(path)
    data = read_toml(path, "ensemble file")
    top = Table(data, path, "", TOP_KEYS)
    name = top.string("name", required=True)
    plan = _plan(top, "plan")
    tables = top.tables("member", MEMBER_KEYS)
    if not tables:
        raise InputFileError(f"{path}: [[member]] is missing: list each player as a [[member]] with an "
                             "instrument")
    members = []
    for table in tables:
        source = table.string("instrument", required=True)
        local = path.parent / source
        try:
            instrument = load_instrument(local if local.is_file() else source)
        except DriftError as error:
            table.fail("instrument", f"= '{source}': {error}")
        own = _plan(table, "plan")
        if own is not None and plan is not None and plan_duration_s(own) != plan_duration_s(plan):
            table.fail("plan", f"lasts {plan_duration_s(own) / 60:g} min; it must last as long as the "
                               f"ensemble's plan ({plan_duration_s(plan) / 60:g} min)")
        members.append(Member(instrument, table.string("label", default=instrument.name), own))
    return Ensemble(name, tuple(members), plan, top.string("description", default=""))
