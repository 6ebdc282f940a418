"""Hostile input: every bad building file gives exit status 2 and names file, item and field.

The committed corpus (``corpus/``, described by ``corpus/expected.toml``) holds small bad files;
the huge and deeply nested ones are written at test time. Every case must give exit status 2,
nothing on stdout, no traceback and no "internal error" on stderr, every expected fragment on
stderr, in bounded time. Most committed cases run in this process through the CLI's own wrapper
(``run_app``) to keep the suite fast; a sample of them and every generated case run the real
command in a child process under a 2 GiB address-space limit.

Cases marked ``xfail`` in expected.toml are defects found in src/ and reported to the lead; they are
strict, so a fix shows up as an unexpected pass to be unmarked.
"""

from __future__ import annotations

import contextlib
import io
import os
import re
import resource
import subprocess
import sys
import time
import tomllib
from concurrent.futures import Future, ThreadPoolExecutor
from dataclasses import dataclass
from pathlib import Path

import pytest

CORPUS = Path(__file__).parent / "corpus"
EXPECTED: dict[str, dict] = tomllib.loads((CORPUS / "expected.toml").read_text(encoding="utf-8"))
MEMORY_LIMIT = 2 * 1024**3  # bytes of address space for a child process
WALL_LIMIT_S = 20.0
MAX_STDERR = 16_384  # characters: a message never echoes a huge input back


@dataclass(frozen=True)
class Run:
    status: int
    stdout: str
    stderr: str
    seconds: float


def run_in_process(path: Path | str) -> Run:
    """``knockproof check PATH`` through the CLI's error wrapper, in this process."""
    from knockproof.cli.app import app
    from knockproof.cli.state import run_app

    out, err = io.StringIO(), io.StringIO()
    argv = sys.argv
    sys.argv = ["knockproof", "check", str(path)]
    t0 = time.perf_counter()
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            status = run_app(app)
    finally:
        sys.argv = argv
    return Run(status, out.getvalue(), err.getvalue(), time.perf_counter() - t0)


def _limit_memory() -> None:
    resource.setrlimit(resource.RLIMIT_AS, (MEMORY_LIMIT, MEMORY_LIMIT))


def run_child(path: Path | str, timeout: float = 60) -> Run:
    """The real command in a child process: fixed width, colour off, 2 GiB of address space."""
    env = {**os.environ, "NO_COLOR": "1", "COLUMNS": "200", "TERM": "dumb"}
    t0 = time.perf_counter()
    p = subprocess.run(
        [sys.executable, "-m", "knockproof", "check", str(path)], capture_output=True, text=True,
        env=env, timeout=timeout, preexec_fn=_limit_memory, errors="replace",
    )
    return Run(p.returncode, p.stdout, p.stderr, time.perf_counter() - t0)


def check_run(run: Run, name: str, spec: dict) -> None:
    """The promises every bad input gets (docs/limits.md, docs/input-format.md 'Error messages')."""
    head = run.stderr[:2000]
    assert "Traceback" not in run.stderr and "Traceback" not in run.stdout, head
    assert "internal error" not in run.stderr, head
    assert "MemoryError" not in run.stderr, f"{name}: ran out of memory\n{head}"
    assert run.status == 2, f"{name}: exit status {run.status}\n{head}"
    assert run.stdout == "", f"{name}: stdout not empty: {run.stdout[:500]}"
    assert run.stderr.startswith("error:"), head
    assert len(run.stderr) <= MAX_STDERR, f"{name}: {len(run.stderr)} characters on stderr"
    assert run.seconds < WALL_LIMIT_S, f"{name}: took {run.seconds:.1f} s"
    for fragment in spec["stderr"]:
        assert re.search(fragment, run.stderr), f"{name}: no /{fragment}/ in stderr:\n{head}"
    for fragment in spec.get("forbid", []):
        assert not re.search(fragment, run.stderr), f"{name}: /{fragment}/ in stderr:\n{head}"
    if "max_stderr_lines" in spec:
        assert len(run.stderr.splitlines()) <= spec["max_stderr_lines"], head


def _param(name: str, spec: dict) -> object:
    marks = [pytest.mark.xfail(reason=spec["xfail"], strict=True)] if "xfail" in spec else []
    return pytest.param(name, spec, id=name, marks=marks)


def test_corpus_is_large_small_and_described():
    files = {p.name for p in CORPUS.iterdir() if p.name != "expected.toml"}
    assert files == set(EXPECTED), files ^ set(EXPECTED)
    assert len(files) >= 40
    assert sum(p.stat().st_size for p in CORPUS.iterdir()) < 200_000


@pytest.mark.parametrize(
    ("name", "spec"),
    [_param(n, s) for n, s in sorted(EXPECTED.items()) if not s.get("isolate")],
)
def test_corpus_in_process(name: str, spec: dict):
    check_run(run_in_process(CORPUS / name), name, spec)


# ------------------------------------------------------------------ the real command, in children

BASE = (CORPUS / "length-nan.toml").read_text(encoding="utf-8")
BASE = BASE.replace("length = nan", "length = 18")


def _replace(old: str, new: str) -> str:
    assert old in BASE
    return BASE.replace(old, new, 1)


NAME_LINE = 'name = "Alder Street Fourplex (invented)"'
#: Files written at test time: name -> (content, expected fragments, xfail reason or "").
GENERATED: dict[str, tuple[bytes | None, list[str], str]] = {
    "deep-arrays-10000.toml": (
        _replace(NAME_LINE, "name = " + "[" * 10_000 + "]" * 10_000).encode(),
        ["file", "too deeply"], ""),
    "deep-inline-tables-10000.toml": (
        _replace(NAME_LINE, "name = " + "{ a = " * 10_000 + "1" + " }" * 10_000).encode(),
        ["file", "too deeply"], ""),
    "deep-dotted-header-10000.toml": (
        (BASE + "\n[" + ".".join(["a"] * 10_000) + "]\nb = 1\n").encode(),
        ["field 'a'", "not a known key"], ""),
    "name-10-mb.toml": (
        _replace(NAME_LINE, 'name = "' + "N" * 10_000_000 + '"').encode(),
        ["file", r"5,242,880|5 MiB"], ""),
    "comments-6-mib.toml": (
        (BASE + ("# padding " + "x" * 90 + "\n") * 63_000).encode(),
        ["file", r"5,242,880|5 MiB"], ""),
    "name-4-mb.toml": (
        _replace(NAME_LINE, 'name = "' + "N" * 4_000_000 + '"').encode(),
        [r"\[building\]", "field 'name'", "200"], ""),
    "length-4-mb-string.toml": (
        _replace("length = 18", 'length = "' + "x" * 4_000_000 + '"').encode(),
        ['pipe "C2"', "field 'length'"], ""),
    "id-4-mb.toml": (
        _replace('id = "C2"', 'id = "' + "C" * 4_000_000 + '"').encode(),
        ["field 'id'", "200"], ""),
    "a-directory.toml": (None, ["is a directory"], ""),
    "no-such-file.toml": (None, ["no such file"], ""),
}
#: Committed cases also run through the real command (the rest run in process).
CHILD_SAMPLE = ["empty.toml", "not-utf8.toml", "length-nan.toml", "pressure-inf.toml",
                "loop.toml", "template-exponential.toml", "template-millions-of-nodes.toml",
                "fixture-unknown-node.toml"]


@pytest.fixture(scope="module")
def child_runs(tmp_path_factory: pytest.TempPathFactory) -> dict[str, Future[Run]]:
    """Start every child-process case at once, two at a time (this machine has two cores)."""
    folder = tmp_path_factory.mktemp("hostile")
    paths: dict[str, Path] = {}
    for name, (data, _, _) in GENERATED.items():
        paths[name] = folder / name
        if name == "a-directory.toml":
            paths[name].mkdir()
        elif data is not None:
            paths[name].write_bytes(data)
    for name, spec in EXPECTED.items():
        if name in CHILD_SAMPLE or spec.get("isolate"):
            paths[name] = CORPUS / name
    pool = ThreadPoolExecutor(max_workers=2)
    futures = {name: pool.submit(run_child, path) for name, path in paths.items()}
    pool.shutdown(wait=False)
    return futures


def _child_params() -> list[object]:
    params = []
    for name, (_, fragments, xfail) in GENERATED.items():
        spec: dict = {"stderr": [re.escape(name), *fragments]}
        if xfail:
            spec["xfail"] = xfail
        params.append(_param(name, spec))
    for name, spec in sorted(EXPECTED.items()):
        if name in CHILD_SAMPLE or spec.get("isolate"):
            params.append(_param(name, spec))
    return params


@pytest.mark.parametrize(("name", "spec"), _child_params())
def test_real_command_in_child(name: str, spec: dict, child_runs: dict[str, Future[Run]]):
    check_run(child_runs[name].result(), name, spec)


def test_endless_device_is_refused():
    if not Path("/dev/zero").exists():
        pytest.skip("no /dev/zero here")
    run = run_child("/dev/zero")
    check_run(run, "/dev/zero", {"stderr": ["/dev/zero", "file"]})


def test_corpus_in_child_matches_in_process():
    """The in-process wrapper gives the same status and stderr as the real command."""
    name = "length-in-psi.toml"
    a, b = run_in_process(CORPUS / name), run_child(CORPUS / name)
    assert (a.status, a.stdout) == (b.status, b.stdout)
    assert " ".join(a.stderr.split()) == " ".join(b.stderr.split())


def test_wide_header_within_limits_is_screened_in_bounded_time(tmp_path: Path):
    """A valid file far inside the 200,000-item limit must not take minutes (docs/limits.md).

    Only the closed-form screen (``analyze``) runs here, in a child so that it can be stopped.
    """
    star = _replace('size = "1"', 'size = "4"') + (
        '\n[[template]]\nname = "basin"\n\n[[template.pipe]]\nid = "B{k}"\nfrom = "main"\n'
        'to = "b{k}"\nlength = 4\nsize = "1/2"\n\n[[template.fixture]]\nid = "L{k}"\n'
        'kind = "lavatory"\ncold = "b{k}"\n\n[[place]]\ntemplate = "basin"\n'
        'for = { k = "1..5000" }\n'
    )
    path = tmp_path / "wide-header.toml"
    path.write_text(star, encoding="utf-8")
    code = "import sys; from knockproof.analysis.run import analyze; analyze(sys.argv[1])"
    try:
        subprocess.run([sys.executable, "-c", code, str(path)], check=True, timeout=10,
                       capture_output=True, preexec_fn=_limit_memory)
    except subprocess.TimeoutExpired:
        pytest.fail("the closed-form screen did not finish in 10 s")
