"""Big and hostile project files are refused quickly with a plain message (issue 9, deliverable 6).

What a user would notice: opening a named pipe or a device must not hang or fill the memory, an
oversized file says how to open it anyway, deep nesting is not a crash, a byte-order mark (as some
editors write) is fine. Every refusal is a ``ProjectFileError`` with ``(path, message)`` problems.
The limits themselves are ours (see ``solver.project_io`` and ``solver.model``).
"""

from __future__ import annotations

import json
import os
import sys
import threading
from pathlib import Path

import pytest

from solver import project_io
from solver.errors import ProjectFileError
from solver.model import MAX_ALTERNATIVES, MAX_SEGMENTS, Project
from solver.project_io import dump_project, load_project, parse_project, project_from_dict

SAMPLE = Path(__file__).resolve().parents[1] / "sample_projects" / "glycol_return.json"


def sample_text() -> str:
    return SAMPLE.read_text(encoding="utf-8")


def refusal(call) -> tuple[ProjectFileError, str]:
    with pytest.raises(ProjectFileError) as info:
        call()
    exc = info.value
    assert exc.problems, "a ProjectFileError must list its problems"
    return exc, " ".join(message for _, message in exc.problems)


# --------------------------------------------------------------------------- not a regular file


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes are a POSIX feature")
def test_a_named_pipe_is_refused_without_blocking(tmp_path):
    fifo = tmp_path / "line.json"
    os.mkfifo(fifo)
    outcome: list = []

    def open_it():
        try:
            load_project(fifo)
        except ProjectFileError as exc:
            outcome.append(exc)
        except BaseException as exc:  # noqa: BLE001 - handed to the test thread to fail on
            outcome.append(exc)

    reader = threading.Thread(target=open_it, daemon=True)
    reader.start()
    reader.join(timeout=10)
    if reader.is_alive():  # blocked in open(): give it a writer so the thread can end, then fail
        fd = os.open(fifo, os.O_WRONLY | os.O_NONBLOCK)
        os.close(fd)
        reader.join(timeout=5)
        pytest.fail("opening a named pipe blocked")
    assert len(outcome) == 1 and isinstance(outcome[0], ProjectFileError), outcome
    text = " ".join(message for _, message in outcome[0].problems)
    assert "named pipe" in text and "regular files only" in text


@pytest.mark.skipif(not hasattr(os, "mkfifo"), reason="named pipes are a POSIX feature")
def test_a_pipe_swapped_in_after_the_check_is_still_refused_without_blocking(tmp_path, monkeypatch):
    # the path is checked, then opened: if a named pipe replaced the file in between, the open must
    # not wait for a writer and the open file is checked again
    fifo = tmp_path / "line.json"
    os.mkfifo(fifo)
    regular = (tmp_path / "regular.json")
    regular.write_text("{}")
    real_stat = os.stat

    def stat_as_if_regular(path, *args, **kwargs):
        return real_stat(regular if Path(path) == fifo else path, *args, **kwargs)

    monkeypatch.setattr(os, "stat", stat_as_if_regular)
    outcome: list = []
    reader = threading.Thread(target=lambda: outcome.append(refusal(lambda: load_project(fifo))[1]), daemon=True)
    reader.start()
    reader.join(timeout=10)
    if reader.is_alive():
        os.close(os.open(fifo, os.O_WRONLY | os.O_NONBLOCK))
        reader.join(timeout=5)
        pytest.fail("opening a named pipe blocked")
    assert outcome and "named pipe" in outcome[0]


@pytest.mark.skipif(not Path("/dev/zero").exists(), reason="needs /dev/zero")
def test_dev_zero_is_refused_as_a_device():
    exc, text = refusal(lambda: load_project("/dev/zero"))
    assert "a device" in text and "/dev/zero" in exc.summary


def test_a_folder_is_refused(tmp_path):
    _, text = refusal(lambda: load_project(tmp_path))
    assert "a folder" in text


def test_a_missing_file_says_so(tmp_path):
    exc, text = refusal(lambda: load_project(tmp_path / "absent.json"))
    assert "no such file" in text and "absent.json" in exc.summary


# --------------------------------------------------------------------------- size


def test_a_file_over_the_size_limit_is_refused_and_says_how_to_raise_it(tmp_path):
    path = tmp_path / "line.json"
    path.write_text(sample_text(), encoding="utf-8")
    size = path.stat().st_size
    _, text = refusal(lambda: load_project(path, max_bytes=size - 1))
    assert project_io.MAX_FILE_MB_VARIABLE in text and "--max-file-mb" in text
    assert load_project(path, max_bytes=size) == load_project(SAMPLE)  # exactly at the limit: fine


def test_a_big_file_is_refused_by_its_size_before_reading(tmp_path):
    # a sparse 5 GB file: refused from its size at once (reading it first would take the memory)
    path = tmp_path / "huge.json"
    with open(path, "wb") as fh:
        fh.truncate(5 * 10**9)
    _, text = refusal(lambda: load_project(path))
    assert "the file is 5,000 MB" in text and "more than" not in text


def test_the_environment_variable_sets_the_limit(tmp_path, monkeypatch):
    path = tmp_path / "line.json"
    path.write_bytes(SAMPLE.read_bytes())
    size = path.stat().st_size
    monkeypatch.setenv(project_io.MAX_FILE_MB_VARIABLE, repr((size - 1) / 1e6))
    _, text = refusal(lambda: load_project(path))
    assert "MB" in text
    monkeypatch.setenv(project_io.MAX_FILE_MB_VARIABLE, repr((size + 1) / 1e6))
    assert isinstance(load_project(path), Project)
    monkeypatch.setenv(project_io.MAX_FILE_MB_VARIABLE, "lots")
    _, text = refusal(lambda: load_project(path))
    assert project_io.MAX_FILE_MB_VARIABLE in text and "lots" in text


def test_the_default_limit_opens_the_largest_alternative_the_model_allows():
    # one full segment of the demo written by Calorun, times the most segments allowed: the default
    # limit must not refuse a file Calorun itself would write (sizes measured, not assumed)
    project = project_io.load_project(Path(__file__).resolve().parents[1] / "app" / "demo_project.json")
    one = len(json.dumps(project.alternatives[0].segments[0].model_dump(mode="json"), indent=2)) + 2 * 6 * 4
    assert one * MAX_SEGMENTS < project_io.DEFAULT_MAX_FILE_MB * 1e6


@pytest.mark.skipif(not Path("/proc/self/status").exists(), reason="needs /proc")
def test_a_file_that_reports_no_size_is_still_read_only_up_to_the_limit():
    # files under /proc report a size of 0 but hold text: the read itself stops at the limit
    _, text = refusal(lambda: load_project("/proc/self/status", max_bytes=64))
    assert "more than" in text


def test_the_cli_option_raises_the_limit(tmp_path, capsys):
    from app.cli import EXIT_INVALID, EXIT_OK, main

    path = tmp_path / "line.json"
    path.write_bytes(SAMPLE.read_bytes())
    assert main(["solve", str(path), "--json", "--max-file-mb", "0.001"]) == EXIT_INVALID
    err = capsys.readouterr().err
    assert "--max-file-mb" in err and "Traceback" not in err
    assert main(["solve", str(path), "--json", "--max-file-mb", "1"]) == EXIT_OK


# --------------------------------------------------------------------------- structure


def test_deep_nesting_is_refused_not_a_recursion_error():
    # 100 000 deep: json itself gives up (RecursionError); 70 deep inside a project parses, but no
    # project is that deep
    _, text = refusal(lambda: parse_project("[" * 100_000 + "]" * 100_000))
    assert "nested more than" in text
    deep = json.loads(sample_text())
    deep["description"] = json.loads("[" * 70 + "]" * 70)
    _, text = refusal(lambda: parse_project(json.dumps(deep)))
    assert "nested more than" in text


@pytest.mark.parametrize("text", ["5", '"a line"', "null", "true"])
def test_a_file_holding_no_object_is_refused(text):
    _, message = refusal(lambda: parse_project(text))
    assert "not an object" in message


def test_a_byte_order_mark_is_accepted(tmp_path):
    path = tmp_path / "bom.json"
    path.write_bytes(b"\xef\xbb\xbf" + SAMPLE.read_bytes())
    assert load_project(path) == load_project(SAMPLE)
    assert parse_project("\ufeff" + sample_text()) == load_project(SAMPLE)


def test_text_that_is_not_utf8_is_refused_with_the_byte(tmp_path):
    path = tmp_path / "latin1.json"
    path.write_bytes(sample_text().replace("Fernbrook", "F\u00e9rnbrook").encode("latin-1", "replace"))
    if b"\xe9" not in path.read_bytes():
        pytest.skip("the sample changed")
    _, text = refusal(lambda: load_project(path))
    assert "UTF-8" in text and "0xe9" in text


def test_a_number_with_thousands_of_digits_is_refused():
    # Python refuses to convert integers of more than 4300 digits (a ValueError, not a JSON error)
    text = ('{"format": "calorun-project", "schema_version": 1, "alternatives": [{"segments": [{"length_m": '
            + "9" * 5000 + "}]}]}")
    _, message = refusal(lambda: parse_project(text))
    assert "digits" in message


def _spy_on_validation(monkeypatch) -> list:
    """Record every validation of a whole project (a refusal by count must come before any)."""
    calls: list = []
    validate = Project.model_validate

    def spy(*args, **kwargs):
        calls.append(args)
        return validate(*args, **kwargs)

    monkeypatch.setattr(Project, "model_validate", spy)
    return calls


def test_too_many_alternatives_are_refused_before_any_is_built(monkeypatch):
    data = json.loads(sample_text())
    alt = data["alternatives"][0]
    data["alternatives"] = [dict(alt, name=f"A{i}") for i in range(MAX_ALTERNATIVES + 1)]
    data["baseline"] = None
    calls = _spy_on_validation(monkeypatch)
    exc, text = refusal(lambda: project_from_dict(data))
    assert [p for p, _ in exc.problems] == ["alternatives"]
    assert f"{MAX_ALTERNATIVES + 1:,}" in text and f"{MAX_ALTERNATIVES:,}" in text
    assert not calls, "the alternatives were validated before their number was checked"
    data["alternatives"] = data["alternatives"][:MAX_ALTERNATIVES]  # at the limit: fine
    assert len(project_from_dict(data).alternatives) == MAX_ALTERNATIVES and calls


def test_too_many_segments_are_refused_before_any_is_built(monkeypatch):
    data = json.loads(sample_text())
    seg = data["alternatives"][1]["segments"][0]
    data["alternatives"][1]["segments"] = [seg] * (MAX_SEGMENTS + 1)
    calls = _spy_on_validation(monkeypatch)
    exc, text = refusal(lambda: project_from_dict(data))
    assert [p for p, _ in exc.problems] == ["alternatives[1].segments"]
    assert f"{MAX_SEGMENTS + 1:,}" in text
    assert not calls


def test_a_huge_value_is_quoted_short_in_the_message():
    data = json.loads(sample_text())
    data["alternatives"][0]["segments"][0]["length_m"] = "9" * 1_000_000
    exc, text = refusal(lambda: parse_project(json.dumps(data)))
    assert len(str(exc)) < 1_000, "a message must not repeat a megabyte of the file"
    assert "alternatives[0].segments[0].length_m" in str(exc)


def test_the_samples_still_load():
    demo = Path(__file__).resolve().parents[1] / "app" / "demo_project.json"
    for path in sorted(SAMPLE.parent.glob("*.json")) + [demo]:
        project = load_project(path)
        assert parse_project(dump_project(project)) == project, path


if __name__ == "__main__":  # pragma: no cover
    sys.exit(pytest.main([__file__, "-q"]))
