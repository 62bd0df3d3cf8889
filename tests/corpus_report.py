"""Agreement of dimfit's verdicts with the trade's expectations on the verdict corpus.

    python -m tests.corpus_report [--timeout S] [--only TEXT ...] [--messages] [--markdown]

Every circuit in ``tests/data/corpus`` is judged by ``compat.evaluate.evaluate`` in a
process of its own (so a case that runs past ``--timeout`` seconds is stopped and
noted, and the next one goes on).  Per case it prints the expected verdict, the
defensible set, the verdict got, whether that agrees (the expected one), is
defensible (in the set) or disagrees, the ids of the failing and caution checks, and
the wall time of the evaluation; at the end the counts and the slowest case.
The expectations are read from ``tests/data/corpus/cases.toml``, the one place they
are kept (common practice and from memory; see the corpus README).

``--one FILE`` evaluates one circuit in this process and prints one JSON line (the
worker the report starts for each case).
"""
from __future__ import annotations

import argparse
import json
import subprocess
import sys
import time
import tomllib
from pathlib import Path

CORPUS_DIR = Path(__file__).resolve().parent / "data" / "corpus"
CASES_FILE = CORPUS_DIR / "cases.toml"
VERDICTS = ("suitable", "suitable-with-cautions", "unsuitable", "site-test-needed")
# Engineering choice: a case still running after 5 minutes is stopped; the issue asks
# for every check of every corpus circuit to finish in a few seconds.
DEFAULT_TIMEOUT_S = 300.0


def load_cases() -> list[dict]:
    """The corpus cases from cases.toml, each with its circuit file checked to exist."""
    with open(CASES_FILE, "rb") as fh:
        cases = tomllib.load(fh)["case"]
    for c in cases:
        if c["expected"] not in VERDICTS or not set(c["defensible"]) <= set(VERDICTS):
            raise ValueError(f"{CASES_FILE.name}: {c['file']}: unknown verdict")
        if c["expected"] not in c["defensible"]:
            raise ValueError(f"{CASES_FILE.name}: {c['file']}: the expected verdict must be in the defensible set")
        if not (CORPUS_DIR / c["file"]).is_file():
            raise ValueError(f"{CASES_FILE.name}: {c['file']}: no such circuit file")
    return cases


def grade(case: dict, verdict: str) -> str:
    """"agree" (the expected verdict), "defensible" (another in the set) or "disagree"."""
    if verdict == case["expected"]:
        return "agree"
    if verdict in case["defensible"]:
        return "defensible"
    return "disagree"


def evaluate_file(path) -> dict:
    """Evaluate one circuit file; the verdict, the failing and caution checks (with
    their messages) and the wall time of the evaluation [s] (reading excluded)."""
    from compat.evaluate import evaluate
    from compat.report import Status
    from loads.files import read_circuit

    circuit = read_circuit(path)
    t0 = time.perf_counter()
    report = evaluate(circuit)
    wall_s = time.perf_counter() - t0
    return {"file": Path(path).name, "verdict": str(report.verdict), "wall_s": wall_s,
            "fail": [c.id for c in report.checks if c.status is Status.FAIL],
            "caution": [c.id for c in report.checks if c.status is Status.CAUTION],
            "messages": {c.id: c.message for c in report.checks if c.status in (Status.FAIL, Status.CAUTION)}}


def run_in_subprocess(path: Path, timeout_s: float) -> dict:
    """``evaluate_file`` in a fresh interpreter, stopped after ``timeout_s``."""
    t0 = time.perf_counter()
    try:
        out = subprocess.run([sys.executable, "-m", "tests.corpus_report", "--one", str(path)],
                             capture_output=True, text=True, timeout=timeout_s,
                             cwd=str(Path(__file__).resolve().parent.parent))
    except subprocess.TimeoutExpired:
        return {"file": path.name, "verdict": None, "timed_out": True, "wall_s": time.perf_counter() - t0,
                "fail": [], "caution": [], "messages": {}}
    lines = [ln for ln in out.stdout.splitlines() if ln.startswith("{")]
    if out.returncode != 0 or not lines:
        tail = (out.stderr.strip().splitlines() or ["no output"])[-1]
        return {"file": path.name, "verdict": None, "error": tail, "wall_s": time.perf_counter() - t0,
                "fail": [], "caution": [], "messages": {}}
    return json.loads(lines[-1])


def summarise(rows: list[tuple[dict, dict]]) -> dict:
    """Counts over the cases that finished: agree, defensible (incl. agree), disagree."""
    done = [(c, r) for c, r in rows if r.get("verdict")]
    grades = [grade(c, r["verdict"]) for c, r in done]
    n = len(done)
    agree = grades.count("agree")
    defensible = agree + grades.count("defensible")
    slow = max(done, key=lambda cr: cr[1]["wall_s"]) if done else None
    return {"cases": len(rows), "finished": n, "agree": agree, "defensible": defensible,
            "disagree": grades.count("disagree"),
            "not_finished": [r["file"] for c, r in rows if not r.get("verdict")],
            "slowest": (slow[1]["file"], slow[1]["wall_s"]) if slow else None}


def _line(case: dict, r: dict) -> str:
    got = r.get("verdict") or ("TIMED OUT" if r.get("timed_out") else f"ERROR: {r.get('error')}")
    g = grade(case, r["verdict"]) if r.get("verdict") else "-"
    return (f"{case['file']:40s} {case['expected']:24s} {got:24s} {g:10s} {r['wall_s']:7.1f} s  "
            f"fail: {','.join(r['fail']) or '-'}  caution: {','.join(r['caution']) or '-'}")


def markdown(rows: list[tuple[dict, dict]]) -> str:
    out = ["| file | expected | defensible | got | grade | failing checks | caution checks | wall [s] |",
           "|---|---|---|---|---|---|---|---|"]
    for c, r in rows:
        got = r.get("verdict") or ("timed out" if r.get("timed_out") else "error")
        g = grade(c, r["verdict"]) if r.get("verdict") else "-"
        out.append(f"| `{c['file']}` | {c['expected']} | {', '.join(c['defensible'])} | {got} | {g} | "
                   f"{', '.join(r['fail']) or '–'} | {', '.join(r['caution']) or '–'} | {r['wall_s']:.1f} |")
    return "\n".join(out)


def main(argv=None) -> int:
    ap = argparse.ArgumentParser(prog="python -m tests.corpus_report", description=__doc__.splitlines()[0])
    ap.add_argument("--one", help="evaluate one circuit file and print one JSON line")
    ap.add_argument("--timeout", type=float, default=DEFAULT_TIMEOUT_S, help="seconds per case (default 300)")
    ap.add_argument("--only", nargs="*", default=(), help="only the cases whose file name contains one of these")
    ap.add_argument("--messages", action="store_true", help="print the messages of failing and caution checks")
    ap.add_argument("--markdown", action="store_true", help="also print a Markdown table")
    ap.add_argument("--json", help="also write the rows as JSON to this file")
    args = ap.parse_args(argv)
    if args.one:
        print(json.dumps(evaluate_file(args.one)))
        return 0
    cases = [c for c in load_cases() if not args.only or any(s in c["file"] for s in args.only)]
    print(f"{'file':40s} {'expected':24s} {'got':24s} {'grade':10s} {'wall':>9s}")
    rows = []
    for c in cases:
        r = run_in_subprocess(CORPUS_DIR / c["file"], args.timeout)
        rows.append((c, r))
        print(_line(c, r), flush=True)
        if args.messages:
            for cid, msg in r["messages"].items():
                print(f"    {cid}: {msg}", flush=True)
    s = summarise(rows)
    n = s["finished"]
    print()
    print(f"cases: {s['cases']}, finished: {n}" + (f", not finished: {', '.join(s['not_finished'])}"
                                                   if s["not_finished"] else ""))
    if n:
        print(f"defensible: {s['defensible']}/{n} ({100 * s['defensible'] / n:.0f} %), "
              f"exact: {s['agree']}/{n} ({100 * s['agree'] / n:.0f} %), disagree: {s['disagree']}")
        print(f"slowest: {s['slowest'][0]} {s['slowest'][1]:.1f} s")
    if args.markdown:
        print()
        print(markdown(rows))
    if args.json:
        Path(args.json).write_text(json.dumps([{"case": c, "result": r} for c, r in rows], indent=1))
    return 0


if __name__ == "__main__":
    sys.exit(main())
