"""Reading the project's TOML files (instruments, climates, materials) with strict, clear checks,
and writing output files whole or not at all.

Every problem raises :class:`drift.errors.InputFileError` with a message that names the file, the
key (as ``[table] key``) and what is allowed. Unknown keys are errors, with a did-you-mean
suggestion.
"""

from __future__ import annotations

import difflib
import math
import os
import signal
import stat
import sys
import tempfile
import threading
import tomllib
from importlib import resources
from pathlib import Path

from drift.errors import DriftError, InputFileError


#: Largest input file read [bytes]: instrument, climate and materials files are a few kB.
MAX_FILE_BYTES = 1_000_000


def read_text_file(path: str | Path, what: str = "file") -> str:
    """The text of an input file; problems raise InputFileError naming the file.

    Only regular files are read (a folder, device or pipe is refused before reading, so nothing
    blocks), at most :data:`MAX_FILE_BYTES`, decoded as UTF-8 (a leading byte-order mark is
    dropped).
    """
    path = Path(path)
    try:
        info = path.stat()
        if stat.S_ISDIR(info.st_mode):
            raise InputFileError(f"{path}: is a folder; give {_article(what)} {what}")
        if not stat.S_ISREG(info.st_mode):
            raise InputFileError(f"{path}: is not a regular file (a device or pipe); give {_article(what)} {what}")
        with path.open("rb") as stream:
            raw = stream.read(MAX_FILE_BYTES + 1)
    except FileNotFoundError:
        raise InputFileError(f"{path}: no such {what}") from None
    except OSError as error:
        raise InputFileError(f"{path}: cannot read the {what}: {error.strerror or error}") from None
    if len(raw) > MAX_FILE_BYTES:
        raise InputFileError(f"{path}: is larger than {MAX_FILE_BYTES // 1_000_000} MB; {_article(what)} {what} is "
                             "a short text file")
    try:
        return raw.decode("utf-8-sig")
    except UnicodeDecodeError as error:
        raise InputFileError(f"{path}: is not UTF-8 text (byte {error.start + 1}); save it as UTF-8") from None


def _article(word: str) -> str:
    return "an" if word[:1].lower() in "aeiou" else "a"


def read_toml(path: str | Path, what: str = "file") -> dict:
    """Parse a TOML file (:func:`read_text_file`, :func:`read_toml_text`)."""
    return read_toml_text(read_text_file(path, what), str(Path(path)), what)


def read_toml_text(text: str, label: str, what: str = "file") -> dict:
    """Parse TOML text; a malformed text raises InputFileError naming ``label``.

    Besides TOML's own errors, an integer too long to read and nesting too deep for the parser are
    refused here.
    """
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise InputFileError(f"{label}: not valid TOML: {error}") from None
    except ValueError:  # an integer beyond Python's digit limit
        raise InputFileError(f"{label}: holds a number too long to read (over {sys.get_int_max_str_digits()} "
                             f"digits); give numbers in a few digits") from None
    except RecursionError:
        raise InputFileError(f"{label}: arrays or tables are nested too deeply for {_article(what)} {what}") from None


def choose(name: str, options, what: str, listing: str = "Allowed", more: str = "") -> str:
    """``name`` if it is one of ``options``; else InputFileError naming ``what``, a did-you-mean
    suggestion and the names (``listing: a, b, c`` followed by ``more``)."""
    options = sorted(options)
    if name in options:
        return name
    close = difflib.get_close_matches(name, options, n=1)
    hint = f" (did you mean '{close[0]}'?)" if close else ""
    shown = name if len(name) <= 40 else name[:37] + "..."
    raise InputFileError(f"unknown {what} '{shown}'{hint}. {listing}: {', '.join(options)}{more}")


def bundled_folder(package: str, fallback: Path):
    """The folder of a data package; ``fallback`` when the package is not importable (a data folder
    beside the package in a source checkout, shipped as the package only in the wheel)."""
    try:
        folder = resources.files(package)
        if folder.is_dir():
            return folder
    except ModuleNotFoundError:
        pass
    return fallback


def bundled_files(folder) -> dict:
    """The ``.toml`` files of a folder (a path or a package resource), by name without the suffix."""
    return {entry.name[:-5]: entry for entry in folder.iterdir() if entry.name.endswith(".toml")}


def load_named(source: str | Path, folder, label_prefix: str, what: str) -> tuple[dict, str]:
    """Parsed TOML of a bundled file by name, or of a file by path, and a label for messages.

    A value naming an existing file, ending in ``.toml`` or holding a ``/`` is read as a path;
    anything else is looked up among the ``.toml`` files of ``folder`` (:func:`bundled_folder`),
    labelled ``label_prefix/NAME.toml`` in messages.
    Unknown names raise InputFileError with a did-you-mean suggestion and the bundled names.
    """
    text = str(source)
    path = Path(text)
    try:
        is_file = path.is_file()
    except OSError:  # a name too long for the file system, say
        is_file = False
    if is_file or text.endswith(".toml") or "/" in text:
        return read_toml(path, f"{what} file"), str(path)
    files = bundled_files(folder)
    resource = files[choose(text, files, what, "Bundled", "; or give the path of a .toml file")]
    label = f"{label_prefix}/{resource.name}"
    return read_toml_text(resource.read_text(encoding="utf-8"), label, what), label


def bundled_text(name: str, folder, what: str) -> str:
    """The text of a bundled ``.toml`` file of ``folder`` by name (unknown names: InputFileError
    with a did-you-mean suggestion and the bundled names)."""
    files = bundled_files(folder)
    return files[choose(str(name), files, what, "Bundled")].read_text(encoding="utf-8")


class Table:
    """One table of a parsed TOML file, with typed, range-checked access to its keys.

    ``where`` is the label of the table in messages (``""`` for the top level, ``"[air]"``...).
    """

    def __init__(self, data: dict, path: str | Path, where: str = "", allowed: tuple = ()):
        self.data = data
        self.path = str(path)
        self.where = where
        if not isinstance(data, dict):
            self.fail(None, "must be a table")
        unknown = [key for key in data if key not in allowed]
        if unknown:
            key = unknown[0]
            close = difflib.get_close_matches(key, allowed, n=1)
            hint = f"; did you mean '{close[0]}'?" if close else f"; allowed: {', '.join(allowed)}"
            self.fail(key, f"is not a known key{hint}")

    def label(self, key: str | None) -> str:
        parts = [p for p in (self.where, key) if p]
        return " ".join(parts) if parts else "top level"

    def fail(self, key: str | None, message: str):
        raise InputFileError(f"{self.path}: {self.label(key)} {message}")

    def has(self, key: str) -> bool:
        return key in self.data

    def table(self, key: str, allowed: tuple, required: bool = False) -> "Table":
        """A sub-table (``[key]``); an empty one when absent and not required."""
        if key not in self.data:
            if required:
                raise InputFileError(f"{self.path}: {self._sub(key)} is missing (a table is required here)")
            return Table({}, self.path, self._sub(key), allowed)
        return Table(self.data[key], self.path, self._sub(key), allowed)

    def tables(self, key: str, allowed: tuple) -> list["Table"]:
        """An array of tables (``[[key]]``); empty when absent."""
        items = self.data.get(key, [])
        if not isinstance(items, list):
            self.fail(key, "must be an array of tables ([[...]])")
        return [Table(item, self.path, f"[[{key}]] #{i + 1}", allowed) for i, item in enumerate(items)]

    def _sub(self, key: str) -> str:
        return f"[{key}]" if not self.where else f"{self.where[:-1]}.{key}]"

    def string(self, key: str, default: str | None = None, required: bool = False,
               choices: tuple | None = None) -> str | None:
        if key not in self.data:
            if required:
                self.fail(key, "is missing (a string is required)")
            return default
        value = self.data[key]
        if not isinstance(value, str) or not value.strip():
            self.fail(key, "must be a non-empty string")
        if choices and value not in choices:
            self.fail(key, f"= '{value}' is not allowed; use one of: {', '.join(choices)}")
        return value

    def names(self, key: str, known, what: str) -> list[str]:
        """A list of names (``[]`` when absent), each one of ``known`` and named once; an unknown
        name fails with a did-you-mean suggestion or the list of ``what`` (e.g. "hole")."""
        chosen = self.data.get(key, [])
        if not isinstance(chosen, list) or not all(isinstance(c, str) for c in chosen):
            self.fail(key, f"must be a list of {what} names")
        known = list(known)
        for name in chosen:
            if name not in known:
                close = difflib.get_close_matches(name, known, n=1)
                hint = f"; did you mean '{close[0]}'?" if close else f"; {what}s: {', '.join(known) or 'none'}"
                self.fail(key, f"names unknown {what} '{name}'{hint}")
        if len(set(chosen)) != len(chosen):
            self.fail(key, f"names a {what} twice")
        return chosen

    def boolean(self, key: str, default: bool) -> bool:
        value = self.data.get(key, default)
        if not isinstance(value, bool):
            self.fail(key, "must be true or false")
        return value

    def number(self, key: str, default: float | None = None, required: bool = False,
               low: float = -math.inf, high: float = math.inf, unit: str = "") -> float | None:
        """A finite number in [low, high]; ``default`` when absent (``None`` allowed)."""
        if key not in self.data:
            if required:
                self.fail(key, "is missing (a number is required)")
            return default
        return self.check_number(key, self.data[key], low, high, unit)

    def check_number(self, key, value, low=-math.inf, high=math.inf, unit="") -> float:
        if isinstance(value, bool) or not isinstance(value, (int, float)):
            self.fail(key, f"must be a number, not {short_repr(value)}")
        try:
            value = float(value)
        except OverflowError:
            self.fail(key, f"is a number beyond any allowed range; allowed: {_span(low, high, unit)}")
        if not math.isfinite(value) or not low <= value <= high:
            shown = f"{value:g}"
            if math.isfinite(value) and low <= float(shown) <= high:   # just outside: show every digit
                shown = repr(value)
            self.fail(key, f"= {shown} is outside the allowed range {_span(low, high, unit)}")
        return value


def short_repr(value, limit: int = 40) -> str:
    """``repr(value)`` cut to ``limit`` characters for a message."""
    text = repr(value)
    return text if len(text) <= limit else text[:limit - 3] + "..."


def _span(low: float, high: float, unit: str) -> str:
    unit = f" {unit}" if unit else ""
    if math.isinf(high):
        return f"{low:g}{unit} or more"
    if math.isinf(low):
        return f"{high:g}{unit} or less"
    return f"{low:g} to {high:g}{unit}"


# --------------------------------------------------------------------------------------------
# Writing output files
# --------------------------------------------------------------------------------------------


def check_outputs(outputs, inputs) -> None:
    """Refuse an output file (``--output``, ``--plot``...) that names one of the input files
    (a bundled name or a path each)."""
    seen = {}
    for output in outputs:
        if output is None:
            continue
        out = os.path.realpath(output)
        if out in seen:
            raise DriftError(f"output {output} is named twice (also as {seen[out]}); give each output its own file")
        seen[out] = output
        for source in inputs:
            if source and os.path.isfile(str(source)) and os.path.realpath(str(source)) == out:
                raise DriftError(f"output {output} is the input file {source}; write the result to another file")


def _new_file_mode() -> int:
    """The mode a new file gets under the process's umask (0o666 & ~umask)."""
    umask = os.umask(0)
    os.umask(umask)
    return 0o666 & ~umask


def _terminate(signum, frame):
    raise SystemExit(128 + signum)


def write_file(path: str | os.PathLike, write) -> None:
    """Write a file atomically: ``write(stream)`` fills a temporary binary file in the target's
    folder, which replaces the target only when complete.

    A failed run never leaves a half-written or emptied output file, and SIGTERM during the write
    removes the temporary file too. A symbolic link is written through (its target is replaced,
    the link stays); an existing file keeps its mode, a new one gets the umask's. Errors raise
    DriftError naming ``path`` as given.
    """
    target = Path(os.path.realpath(path))
    try:
        mode = stat.S_IMODE(target.stat().st_mode) if target.exists() else _new_file_mode()
        handle, temporary = tempfile.mkstemp(dir=target.parent, prefix=f".{target.name}.", suffix=".tmp")
    except OSError as error:
        raise DriftError(f"{path}: cannot write the output: {error.strerror or error}") from None
    main_thread = threading.current_thread() is threading.main_thread()
    previous = signal.signal(signal.SIGTERM, _terminate) if main_thread else None
    try:
        os.fchmod(handle, mode)
        with os.fdopen(handle, "wb") as stream:
            write(stream)
        os.replace(temporary, target)
    except OSError as error:
        Path(temporary).unlink(missing_ok=True)
        raise DriftError(f"{path}: cannot write the output: {error.strerror or error}") from None
    except BaseException:
        Path(temporary).unlink(missing_ok=True)
        raise
    finally:
        if main_thread:
            signal.signal(signal.SIGTERM, previous)
