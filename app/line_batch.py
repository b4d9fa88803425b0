"""Design a whole line list at once: ``calorun batch LINELIST --template T.json -o OUTDIR``.

The list is read a row at a time (:func:`solver.line_list.read_line_list`); each good row becomes one
project (:func:`solver.line_list.line_project`) and is designed (:func:`solver.line_design.design_line`) in a
worker: local worker processes (all cores by default), or the workers of a running Dask distributed cluster
(``scheduler``, the optional ``cluster`` install extra). Rows with problems become result rows with the
verdict "error" and the message naming the row, the column and the value; the others still run.

What lands in OUT:

- ``lines/<tag>.json`` — the designed project of each line (opens in the app), and ``lines/<tag>.result.json``
  — its result row and the line's fingerprint (row values + template). A rerun skips a line whose result file
  holds the same fingerprint, so an interrupted run continues where it stopped and an edited row or template
  is designed again;
- ``results.csv`` and ``results.xlsx`` — one row per line in the order of the list, units in the headers,
  rows with problems included;
- ``summary.pdf`` — the portfolio (:mod:`app.reporting.portfolio`; it draws with Qt offscreen, imported only
  when the PDF is written).

The answers do not depend on the number of workers or on the order in which they finish: each line is
designed on its own, and the main process writes every output in list order. Memory stays flat with the
length of the list: rows are read as they are sent, at most a few lines per worker are in flight, and only
the result rows are kept (no profiles). No Qt here (import-linter's headless contract; the PDF is the one
import allowed past it).
"""

from __future__ import annotations

import contextlib
import csv
import dataclasses
import functools
import hashlib
import io
import json
import math
import os
import re
import sys
import time
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any, Callable, Iterable, Iterator, Optional, TextIO, Union

__all__ = ["run_batch", "BatchSummary", "BatchRefused", "safe_tag", "design_task", "error_result",
           "LINES_FOLDER", "RESULTS_CSV", "RESULTS_XLSX", "SUMMARY_PDF", "CLUSTER_EXTRA_HINT"]

LINES_FOLDER = "lines"
RESULTS_CSV = "results.csv"
RESULTS_XLSX = "results.xlsx"
SUMMARY_PDF = "summary.pdf"
RESULT_SUFFIX = ".result.json"
PROJECT_SUFFIX = ".json"
RESULT_FORMAT = "calorun-line-result"
CLUSTER_EXTRA_HINT = 'pip install "calorun[cluster]"'

#: Lines in flight per worker: enough to keep every worker busy while the main process writes files,
#: few enough that rows and results waiting in queues stay a handful whatever the length of the list.
IN_FLIGHT_PER_WORKER = 4
#: A CSV cell: 10 significant digits, as the profile CSV (app.export); non-finite values are left blank.
_CSV_FORMAT = ".10g"
_CSV_ENCODING = "utf-8-sig"  # Excel opens it with the degree signs intact (as app.export)
#: Longest file name stem made from a tag (file systems allow 255 bytes; room for the suffix and a hash).
_TAG_NAME_CHARS = 80
_VERDICT_ORDER = ("ok", "warning", "fails", "error")


class BatchRefused(ValueError):
    """A line list, mapping file, template, output folder or option that cannot be used at all (the
    CLI's exit code 2); the message names the file or option and the value. A bad row is never this:
    it becomes a result row with the verdict "error"."""


@dataclass
class BatchSummary:
    """What a run did. ``counts``: lines per verdict ("ok", "warning", "fails", "error"), every line of
    the list; ``designed``: lines designed in this run; ``reused``: lines skipped because their result
    file held the same fingerprint; ``failing``: (row, tag, verdict, message) of each line that fails or
    could not be designed, in list order; ``pdf_note``: why no summary.pdf was written ("" when it was)."""

    out_dir: Path
    total: int = 0
    designed: int = 0
    reused: int = 0
    counts: dict = field(default_factory=lambda: {v: 0 for v in _VERDICT_ORDER})
    failing: list = field(default_factory=list)
    results_csv: Optional[Path] = None
    results_xlsx: Optional[Path] = None
    summary_pdf: Optional[Path] = None
    pdf_note: str = ""
    workers: str = ""
    elapsed_s: float = 0.0

    @property
    def all_ok(self) -> bool:
        """True when no line fails and every line could be designed (warnings allowed)."""
        return not self.failing

    @property
    def lines_per_s(self) -> float:
        return self.designed / self.elapsed_s if self.elapsed_s > 0 else 0.0


# --------------------------------------------------------------------------- the line files' names


def safe_tag(tag: str) -> str:
    """A file name stem for a line's files: the tag itself when it is a plain name (letters, digits,
    ``-``, ``_``, ``.``), else its plain characters and a short hash of the tag, so two tags never share a
    file (``"FW-2-RS-1041"`` -> ``"FW-2-RS-1041"``, ``"P/101 A"`` -> ``"P_101_A-ed771f99"``)."""
    plain = re.sub(r"[^A-Za-z0-9._-]+", "_", tag).strip("._-")[:_TAG_NAME_CHARS]
    if plain == tag and plain and not _reserved(plain):
        return plain
    digest = hashlib.sha256(tag.encode("utf-8", "surrogatepass")).hexdigest()[:8]
    return f"{plain or 'line'}-{digest}"


def _reserved(name: str) -> bool:
    """Names Windows keeps for devices (CON, NUL, COM1...): never a file name, whatever the suffix."""
    return re.fullmatch(r"(?i)(con|prn|aux|nul|com[0-9]|lpt[0-9])(\..*)?", name) is not None


# --------------------------------------------------------------------------- the worker's task


@functools.lru_cache(maxsize=4)
def _template_from_text(text: str):
    """The template project, parsed once per worker process (every task carries the same text)."""
    from solver.model import Project

    return Project.model_validate(json.loads(text))


def design_task(row, template_text: str, fingerprint: str, system: str = "SI") -> tuple[str, str, Optional[str], dict]:
    """Design one line in a worker: (tag, fingerprint, the designed project's file text or None, the
    result row as :meth:`LineResult.to_dict`). The row's design options (insulation to size, surface and
    heat-loss limits, maximum circuit length) come from its values (:func:`solver.line_design.options_from_row`);
    messages are in ``system``'s units. A problem of the line itself (a row :func:`line_project` cannot make
    a project of, a line the design cannot solve) is a result with the verdict "error" and its message, never
    an exception; an unexpected failure is worded the same way, saying it is one."""
    from app.units import search_words
    from solver.errors import CalorunError
    from solver.line_design import design_line, options_from_row
    from solver.line_list import line_project
    from solver.project_io import dump_project

    template = _template_from_text(template_text)
    try:
        project = line_project(row, template)
    except CalorunError as exc:
        return row.tag, fingerprint, None, _result_dict(error_result(row.row, row.tag, str(exc)))
    try:
        designed, result = design_line(project, **options_from_row(row.values), row=row.row, system=system,
                                       formatter=search_words)
    except CalorunError as exc:
        return row.tag, fingerprint, None, _result_dict(error_result(row.row, row.tag, str(exc)))
    except (ArithmeticError, ValueError, RuntimeError) as exc:
        from app.texts import unexpected_failure

        return row.tag, fingerprint, None, _result_dict(error_result(row.row, row.tag, unexpected_failure(exc)))
    return row.tag, fingerprint, dump_project(designed), _result_dict(result)


# --------------------------------------------------------------------------- result rows


def error_result(row: int, tag: str, message: str):
    """A result row for a line that could not be designed: the verdict "error" and the message, no figures."""
    from solver.line_design import LineResult

    return LineResult(tag=tag, row=row, verdict="error", message=message)


def _result_dict(result) -> dict:
    """A result row as plain JSON values (LineResult.to_dict: NaN as None, an infinite hold time as "inf")."""
    return result.to_dict()


def _result_from_dict(data: dict):
    from solver.line_design import LineResult

    return LineResult.from_dict(data)


def _with_row(result, row: int):
    """The result with the line's row number now (a resumed line may have moved in the list)."""
    return result if result.row == row else dataclasses.replace(result, row=row)


# --------------------------------------------------------------------------- the run


@dataclass
class _Job:
    index: int  # position among the list's lines (the order of every output)
    row: int
    tag: str
    name: str  # safe_tag(tag)
    fingerprint: str
    line: Any  # the LineRow sent to the worker


def run_batch(list_path: Union[str, os.PathLike], template_path, out_dir: Union[str, os.PathLike], *,
              columns: Union[None, str, os.PathLike, dict] = None, workers: Optional[int] = None,
              scheduler: Optional[str] = None, progress: Union[bool, TextIO] = True, system: str = "SI",
              pages: str = "table", pdf: bool = True) -> BatchSummary:
    """Design every line of ``list_path`` (CSV or XLSX) on the template ``template_path`` (a project file,
    or a :class:`~solver.model.Project`) into ``out_dir``; see the module's description.

    ``columns``: a mapping file (path) or dict {"their header": "our column"}; ``workers``: local worker
    processes (default ``os.cpu_count()``); ``scheduler``: the address of a running Dask distributed
    scheduler (``tcp://host:8786``) to run on instead of local processes; ``progress``: a progress bar on
    stderr (True), none (False), or on the given stream; ``system``: "SI" or "US" for the results' units;
    ``pages``: "table" or "per-line" for the summary PDF; ``pdf``: False to write no PDF.

    Raises :class:`BatchRefused` for an unusable list, mapping, output folder or option,
    :class:`~solver.errors.ProjectFileError` for an unusable template, OSError when an output cannot be
    written. Bad rows never raise."""
    from solver.line_list import line_list_fingerprint, read_line_list
    from solver.project_io import dump_project

    started = time.perf_counter()
    if system not in ("SI", "US"):
        raise BatchRefused(f"--units: expected SI or US, got {system!r}")
    if pages not in ("table", "per-line"):
        raise BatchRefused(f"--pages: expected table or per-line, got {pages!r}")
    if workers is not None and (not isinstance(workers, int) or workers < 1):
        raise BatchRefused(f"--workers: must be a whole number of at least 1, got {workers!r}")
    if workers is not None and scheduler:
        raise BatchRefused("--workers: the Dask cluster decides how many workers run; give --workers or "
                           "--scheduler, not both")
    list_path = Path(list_path)
    if not list_path.is_file():
        raise BatchRefused(f"line list: {list_path} is not a file")
    template = _load_template(template_path)
    mapping = _column_map(columns)
    template_text = dump_project(template)

    out = Path(out_dir)
    lines_dir = out / LINES_FOLDER
    try:
        lines_dir.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise BatchRefused(f"-o: cannot make the output folder {lines_dir}: {exc.strerror or exc}") from None

    total = _count_lines(read_line_list, list_path, mapping, template)
    summary = BatchSummary(out_dir=out, total=total)
    bar = _Progress(total, _progress_stream(progress))
    results: list = []  # one result row per line, in list order (None while its line is out)
    seen_names: dict[str, str] = {}  # lower-case file name -> tag (names that clash on a case-blind disk)

    def finish(index: int, result, *, designed: bool) -> None:
        results[index] = result
        if designed:
            summary.designed += 1
        bar.update(designed=designed)

    def jobs() -> Iterator[_Job]:
        """The lines still to design, read as they are wanted; the rest become result rows at once."""
        for index, (row, item) in enumerate(_lines(read_line_list(list_path, mapping, template=template))):
            results.append(None)
            if isinstance(item, tuple):  # the row's tag as written and its problems, in words
                finish(index, error_result(row, *item), designed=False)
                continue
            tag = item.tag
            problem = _name_clash(item, seen_names)
            if problem:
                finish(index, error_result(row, tag, problem), designed=False)
                continue
            name = safe_tag(tag)
            fingerprint = line_list_fingerprint(item, template)
            done = _reusable(lines_dir, name, fingerprint, system)
            if done is not None:
                summary.reused += 1
                finish(index, _with_row(done, row), designed=False)
                continue
            yield _Job(index, row, tag, name, fingerprint, item)

    def landed(job: _Job, outcome) -> None:
        """A worker's answer: write the line's files, keep its result row."""
        if isinstance(outcome, BaseException):  # the worker failed, not the line: no file, so a rerun retries
            message = (f"the line could not be designed: its worker failed ({type(outcome).__name__}: {outcome}); "
                       "the next run tries it again")
            finish(job.index, error_result(job.row, job.tag, message), designed=True)
            return
        _tag, fingerprint, project_text, result_data = outcome
        result = _with_row(_result_from_dict(result_data), job.row)
        _write_line_files(lines_dir, job.name, fingerprint, system, project_text, result)
        finish(job.index, result, designed=True)

    backend = _backend(workers, scheduler)
    summary.workers = backend.description
    try:
        with contextlib.closing(backend):
            backend.run(jobs(), (template_text, system), landed)
    finally:
        bar.close()

    final = [r for r in results if r is not None]
    for result in final:
        verdict = result.verdict if result.verdict in summary.counts else "error"
        summary.counts[verdict] += 1
        if verdict in ("fails", "error"):
            summary.failing.append((result.row, result.tag, verdict, result.message or _worst_words(result)))
    summary.total = len(final)
    summary.results_csv = write_results_csv(final, out / RESULTS_CSV, system)
    summary.results_xlsx = write_results_xlsx(final, out / RESULTS_XLSX, system)
    if pdf:
        summary.summary_pdf, summary.pdf_note = _write_pdf(final, out / SUMMARY_PDF, pages=pages, system=system,
                                                           title=template.name, list_name=list_path.name)
    else:
        summary.pdf_note = "not asked for"
    summary.elapsed_s = time.perf_counter() - started
    return summary


def _load_template(template_path):
    from solver.model import Project
    from solver.project_io import load_project

    if isinstance(template_path, Project):
        return template_path
    return load_project(template_path)  # ProjectFileError names the file and each problem


def _column_map(columns) -> Optional[dict]:
    """The mapping {"their header": "our column"}: as given, or read from a mapping file."""
    from solver.errors import InputError
    from solver.line_list import read_column_map

    if columns is None or isinstance(columns, dict):
        return columns
    try:
        return read_column_map(columns)
    except InputError as exc:
        raise BatchRefused(f"--columns: {exc}") from None


def _count_lines(read_line_list, list_path: Path, mapping, template) -> int:
    """How many lines the list holds (for the progress bar): one pass over the rows, nothing kept. A list
    that cannot be read at all is refused here, before any work."""
    from solver.errors import CalorunError

    try:
        count = sum(1 for _ in _lines(read_line_list(list_path, mapping, template=template)))
    except CalorunError as exc:  # names the file (or the mapping) and what is wrong
        raise BatchRefused(str(exc)) from None
    except OSError as exc:
        raise BatchRefused(f"line list: cannot read {list_path}: {exc.strerror or exc}") from None
    if count == 0:
        raise BatchRefused(f"line list: {list_path} holds a header but no lines")
    return count


def _lines(items: Iterable) -> Iterator[tuple[int, Any]]:
    """(row, LineRow) per good row and (row, (tag as written, the problems in words)) per bad one: the
    reader's problems of one row (one per mistake) are joined into one message. A problem of the header (a
    missing required column) is a row of its own, the first, and every row repeats it."""
    from solver.line_list import RowProblem

    pending: Optional[int] = None
    tag, messages = "", []
    for item in items:
        if isinstance(item, RowProblem):
            if pending is not None and item.row != pending:
                yield pending, (tag, "; ".join(messages))
                messages = []
            pending, tag = item.row, item.tag
            messages.append(str(item))
            continue
        if pending is not None:
            yield pending, (tag, "; ".join(messages))
            pending, messages = None, []
        yield item.row, item
    if pending is not None:
        yield pending, (tag, "; ".join(messages))


def _name_clash(line, seen_names: dict) -> str:
    """A safety net for the line files: a tag whose file name another tag of the list has already (the reader
    refuses tags that differ only in case; :func:`safe_tag` hashes the rest); "" when the name is free."""
    name = safe_tag(line.tag).casefold()
    other = seen_names.setdefault(name, line.tag)
    if other != line.tag:
        return (f"row {line.row}, column 'tag': {line.tag!r} would share its project file with the tag {other!r}; "
                "give it its own tag")
    return ""


def _worst_words(result) -> str:
    worst = getattr(result, "worst_check", "")
    if isinstance(worst, (list, tuple)):
        worst = " ".join(str(w) for w in worst)
    return str(worst or "")


# --------------------------------------------------------------------------- line files (resume)


def _reusable(lines_dir: Path, name: str, fingerprint: str, system: str):
    """The result kept from an earlier run when its fingerprint is this line's, it was designed by this
    version of Calorun with its messages in ``system``'s units, and its project file is there (a line that
    could not be designed has none); None when the line must be designed."""
    path = lines_dir / (name + RESULT_SUFFIX)
    try:
        data = json.loads(path.read_text(encoding="utf-8"))
    except (OSError, ValueError):
        return None
    if not isinstance(data, dict) or data.get("format") != RESULT_FORMAT or data.get("fingerprint") != fingerprint:
        return None
    if data.get("units") != system or data.get("calorun") != _version():
        return None
    try:
        result = _result_from_dict(data["result"])
    except (KeyError, TypeError, ValueError):
        return None
    if result.verdict != "error" and not (lines_dir / (name + PROJECT_SUFFIX)).is_file():
        return None
    return result


def _version() -> str:
    """This Calorun's version (a result designed by another version is designed again)."""
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("calorun")
    except PackageNotFoundError:  # pragma: no cover - run from a source tree that was never installed
        return "unknown"


def _write_line_files(lines_dir: Path, name: str, fingerprint: str, system: str, project_text: Optional[str],
                      result) -> None:
    """The line's project file (when it was designed) and then its result file: the result file is what a
    rerun trusts, so it is written last, each atomically."""
    from solver.safe_write import atomic_write_text

    project_path = lines_dir / (name + PROJECT_SUFFIX)
    if project_text is not None:
        atomic_write_text(project_path, project_text)
    else:
        with contextlib.suppress(FileNotFoundError):
            project_path.unlink()  # an older design of this tag no longer belongs to the row
    record = {"format": RESULT_FORMAT, "fingerprint": fingerprint, "calorun": _version(), "units": system,
              "tag": result.tag, "result": _result_dict(result)}
    atomic_write_text(lines_dir / (name + RESULT_SUFFIX), json.dumps(record, indent=1, ensure_ascii=False) + "\n")


# --------------------------------------------------------------------------- results list


def _table(results: list, system: str) -> tuple[list[str], list[list]]:
    """Header (units in it) and rows of the results list, from each result's ``to_row`` in ``system``'s
    display units (app.units)."""
    from app.units import unit
    from solver.line_design import row_headers

    header = row_headers(system, unit)
    rows = []
    for r in results:
        data = r.to_row(system, unit)
        rows.append([data.get(key) for key in header])
    return header, rows


def _csv_cell(value) -> str:
    if value is None:
        return ""
    if isinstance(value, bool):
        return "yes" if value else "no"
    if isinstance(value, float):
        return f"{value:{_CSV_FORMAT}}" if math.isfinite(value) else ""
    return str(value)


def results_csv_text(results: list, system: str = "SI") -> str:
    """The text of results.csv: one row per line in list order, units in the header."""
    header, rows = _table(results, system)
    buf = io.StringIO()
    writer = csv.writer(buf, lineterminator="\n")
    writer.writerow(header)
    for row in rows:
        writer.writerow([_csv_cell(v) for v in row])
    return buf.getvalue()


def write_results_csv(results: list, path: Path, system: str = "SI") -> Path:
    from solver.safe_write import atomic_write_text

    return atomic_write_text(path, results_csv_text(results, system), encoding=_CSV_ENCODING, newline="")


def write_results_xlsx(results: list, path: Path, system: str = "SI") -> Path:
    """results.xlsx (openpyxl, write-only: rows streamed to the file): the same table as results.csv, numbers
    as numbers, the header row frozen and bold; non-finite values left blank."""
    from openpyxl import Workbook
    from openpyxl.cell import WriteOnlyCell
    from openpyxl.styles import Font

    from solver.safe_write import atomic_replace

    header, rows = _table(results, system)
    book = Workbook(write_only=True)
    sheet = book.create_sheet("Line list results")
    sheet.freeze_panes = "A2"
    for i, title in enumerate(header):
        sheet.column_dimensions[_column_letter(i)].width = max(10, min(48, len(title) + 2))
    bold = Font(bold=True)
    cells = []
    for title in header:
        cell = WriteOnlyCell(sheet, value=title)
        cell.font = bold
        cells.append(cell)
    sheet.append(cells)
    for row in rows:
        sheet.append([_xlsx_cell(v) for v in row])
    with atomic_replace(path) as tmp:
        book.save(tmp)
    return Path(path)


def _xlsx_cell(value):
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if value is None or isinstance(value, (int, float, str)):
        return value
    return str(value)


def _column_letter(index: int) -> str:
    from openpyxl.utils import get_column_letter

    return get_column_letter(index + 1)


def _write_pdf(results: list, path: Path, *, pages: str, system: str, title: str,
               list_name: str) -> tuple[Optional[Path], str]:
    """summary.pdf through app.reporting.portfolio (Qt offscreen, imported only here); (path, "") when
    written, (None, why) when the portfolio module is not installed. A failed write raises OSError."""
    try:
        from app.reporting.portfolio import write_portfolio
    except ImportError as exc:
        return None, f"the portfolio report is not available ({exc})"
    written = write_portfolio(results, path, pages=pages, system=system, title=title, list_name=list_name)
    return Path(written) if written else path, ""


# --------------------------------------------------------------------------- where the lines run


def _backend(workers: Optional[int], scheduler: Optional[str]):
    if scheduler:
        return _DaskBackend(scheduler)
    return _LocalBackend(workers or os.cpu_count() or 1)


class _LocalBackend:
    """Worker processes on this machine (concurrent.futures). Started fresh ("spawn"), never forked:
    the caller may hold threads (the solver's own, a Qt application's) that a forked child would inherit
    half-held."""

    def __init__(self, workers: int):
        self.workers = workers
        self.description = f"{workers} local worker process{'es' if workers != 1 else ''}"
        self._pool = None

    def run(self, jobs: Iterator[_Job], shared: tuple, landed: Callable) -> None:
        import multiprocessing
        from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait

        self._pool = ProcessPoolExecutor(max_workers=self.workers, mp_context=multiprocessing.get_context("spawn"),
                                         initializer=_leave_interrupts_to_the_main_process)
        window = self.workers * IN_FLIGHT_PER_WORKER
        pending: dict = {}

        def settle(block: bool) -> None:
            done, _ = wait(pending, timeout=None if block else 0, return_when=FIRST_COMPLETED)
            for future in done:
                job = pending.pop(future)
                landed(job, _outcome(future.result))

        for job in jobs:
            while len(pending) >= window:
                settle(block=True)
            try:
                future = self._pool.submit(design_task, job.line, shared[0], job.fingerprint, shared[1])
            except RuntimeError as exc:  # the pool broke (a worker was killed): the line says so
                landed(job, exc)
                continue
            pending[future] = job
        while pending:
            settle(block=True)

    def close(self) -> None:
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)


class _DaskBackend:
    """The workers of a running Dask distributed cluster: ``Client(address)``, ``client.submit`` per line
    and ``as_completed`` (Dask's scheduler queues and places the work; no queue of our own)."""

    def __init__(self, address: str):
        try:
            import distributed
        except ImportError:
            raise BatchRefused(f"--scheduler: running on a Dask cluster needs Dask distributed, an optional "
                               f"install ({CLUSTER_EXTRA_HINT})") from None
        self._distributed = distributed
        try:
            self.client = distributed.Client(address, timeout="20s", set_as_default=False)
        except (OSError, TimeoutError, ValueError) as exc:
            raise BatchRefused(f"--scheduler: cannot reach a Dask scheduler at {address!r} ({exc})") from None
        info = self.client.scheduler_info()
        self.threads = sum(int(w.get("nthreads", 1)) for w in info.get("workers", {}).values()) or 1
        self.description = f"Dask cluster at {address} ({len(info.get('workers', {}))} workers, {self.threads} threads)"

    def run(self, jobs: Iterator[_Job], shared: tuple, landed: Callable) -> None:
        as_completed = self._distributed.as_completed(loop=self.client.loop)  # our client, not a global one
        window = max(2, self.threads * IN_FLIGHT_PER_WORKER)
        pending: dict = {}
        template_text, system = shared
        text_future = self.client.scatter(template_text, broadcast=True)  # sent to each worker once

        def settle() -> None:
            future = next(as_completed)
            job = pending.pop(future.key)
            landed(job, _outcome(future.result))
            future.release()

        for job in jobs:
            while len(pending) >= window:
                settle()
            future = self.client.submit(design_task, job.line, text_future, job.fingerprint, system, pure=False)
            pending[future.key] = job
            as_completed.add(future)
        while pending:
            settle()

    def close(self) -> None:
        self.client.close()


def _leave_interrupts_to_the_main_process() -> None:
    """In a worker: ignore Ctrl-C, which the terminal sends to every process of the run; the main process
    stops the run, and the lines written so far are kept for the next run."""
    import signal

    signal.signal(signal.SIGINT, signal.SIG_IGN)


def _outcome(result: Callable):
    """The worker's answer, or the exception that stopped the worker (handed on as the line's error)."""
    try:
        return result()
    except Exception as exc:  # noqa: BLE001 - a dead worker or a lost connection fails only its own line
        return exc


# --------------------------------------------------------------------------- progress


def _progress_stream(progress) -> Optional[TextIO]:
    if progress is True:
        return sys.stderr
    if progress is False or progress is None:
        return None
    return progress


class _Progress:
    """A progress bar: lines done of all, lines per second and the time left. Redrawn in place (at most
    ten times a second) on a terminal; elsewhere (a log file, CI) one line per tenth of the list. The rate
    counts only the lines designed in this run, so lines kept from an earlier run do not make the time left
    look short."""

    WIDTH = 28

    def __init__(self, total: int, stream: Optional[TextIO]):
        self.total = total
        self.stream = stream
        self.done = 0
        self.designed = 0
        self.started = time.perf_counter()
        self.first_designed: Optional[float] = None
        self.tty = bool(stream is not None and getattr(stream, "isatty", lambda: False)())
        self._drawn = 0.0
        self._tenth = 0
        self._width = 0
        if stream is not None and not self.tty:
            print(f"calorun batch: {total} lines", file=stream, flush=True)

    def update(self, *, designed: bool) -> None:
        self.done += 1
        if designed:
            self.designed += 1
        if self.stream is None:
            return
        now = time.perf_counter()
        if self.tty:
            if now - self._drawn >= 0.1 or self.done >= self.total:
                self._drawn = now
                self._draw(self.line(now))
            return
        tenth = (10 * self.done) // max(1, self.total)
        if tenth > self._tenth:
            self._tenth = tenth
            print(f"calorun batch: {self.line(now, bar=False)}", file=self.stream, flush=True)

    def rate(self, now: float) -> float:
        elapsed = now - self.started
        return self.designed / elapsed if self.designed and elapsed > 0 else 0.0

    def line(self, now: float, bar: bool = True) -> str:
        rate = self.rate(now)
        left = self.total - self.done
        parts = [f"{self.done}/{self.total} lines"]
        if bar:
            filled = int(self.WIDTH * self.done / max(1, self.total))
            parts.insert(0, "[" + "#" * filled + "-" * (self.WIDTH - filled) + "]")
        else:
            parts[0] += f" ({100 * self.done // max(1, self.total)} %)"
        parts.append(f"{rate:.1f} lines/s" if rate else "– lines/s")
        if left == 0:
            parts.append(f"done in {_duration(now - self.started)}")
        elif rate:
            words = _duration(left / rate)
            parts.append(f"{words} left" if words.startswith("under") else f"about {words} left")
        return "  ".join(parts) if bar else ", ".join(parts)

    def _draw(self, text: str) -> None:
        pad = max(0, self._width - len(text))
        self._width = len(text)
        self.stream.write("\r" + text + " " * pad)
        self.stream.flush()

    def close(self) -> None:
        if self.stream is not None and self.tty and self._width:
            self._draw(self.line(time.perf_counter()))
            self.stream.write("\n")
            self.stream.flush()


def _duration(seconds: float) -> str:
    """``"under 1 s"``, ``"45 s"``, ``"3 min 20 s"``, ``"2 h 05 min"``."""
    seconds = max(0.0, seconds)
    if seconds < 1:
        return "under 1 s"
    if seconds < 60:
        return f"{seconds:.0f} s"
    if seconds < 3600:
        return f"{int(seconds // 60)} min {int(seconds % 60):02d} s"
    return f"{int(seconds // 3600)} h {int(seconds % 3600 // 60):02d} min"
