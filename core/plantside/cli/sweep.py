"""The ``plantside sweep`` command: run a sweep file to a results folder.

::

    plantside sweep SWEEP.toml --out DIR [--workers N | --scheduler ADDRESS]
                    [--batch-size N] [--restart | --retry-failed] [--plan] [--charts]
                    [--quiet] [--json]

Runs on all local cores by default; ``--scheduler tcp://host:8786`` runs on a Dask
cluster. Finished cases are written as they finish; Ctrl-C keeps them (exit 130) and
the same command continues where it stopped. A case the model refuses is a row with
status ``failed`` and its error; the others go on. The progress bar is plain text on
stderr. Exit status: 0 every case ran, 3 done but some cases failed (a line on stderr
says how many and where the table is), 2 bad input (message on stderr), 130
interrupted.

The parser is added to the main command by :func:`add_sweep_parser`.
"""

from __future__ import annotations

import json
import sys
import time
from pathlib import Path

__all__ = [
    "EXIT_CASES_FAILED",
    "EXIT_INTERRUPTED",
    "ProgressBar",
    "add_sweep_parser",
    "cmd_sweep",
]

EXIT_OK = 0
#: The sweep finished but some cases failed (their rows say why).
EXIT_CASES_FAILED = 3
EXIT_INTERRUPTED = 130


class ProgressBar:
    """A plain-text progress bar on a stream (stderr by default), no dependency.

    On a terminal the bar is redrawn in place; otherwise (a log file, CI) a line is
    written at every 10 % step, so logs stay short.

    Parameters
    ----------
    stream : file object, optional
        Where to write (default :data:`sys.stderr`).
    width : int
        Characters of the bar itself.
    label : str
        Word after the counts (``"cases"``).
    """

    def __init__(self, stream=None, width: int = 30, label: str = "cases"):
        self.stream = sys.stderr if stream is None else stream
        self.width = width
        self.label = label
        self.started = None
        self.first_done = 0
        self.last_step = -1
        isatty = getattr(self.stream, "isatty", None)
        self.live = bool(isatty and isatty())

    def text(self, done: int, total: int) -> str:
        """The bar for ``done`` of ``total`` (with rate and time left once known)."""
        fraction = done / total if total else 1.0
        filled = round(self.width * fraction)
        bar = "#" * filled + "." * (self.width - filled)
        text = f"[{bar}] {done}/{total} {self.label} {100 * fraction:3.0f} %"
        if self.started is not None:
            elapsed = time.perf_counter() - self.started
            new = done - self.first_done
            if new > 0 and elapsed > 0:
                rate = new / elapsed
                left = (total - done) / rate
                text += f"  {rate:.2f} {self.label}/s  {_clock(left)} left"
        return text

    def __call__(self, done: int, total: int) -> None:
        if self.started is None:
            self.started = time.perf_counter()
            self.first_done = done
        line = self.text(done, total)
        if self.live:
            end = "\n" if done >= total else ""
            self.stream.write("\r" + line + end)
        else:
            step = int(10 * done / total) if total else 10
            if step == self.last_step and done < total:
                return
            self.last_step = step
            self.stream.write(line + "\n")
        self.stream.flush()


def _clock(seconds: float) -> str:
    seconds = round(seconds)
    hours, rest = divmod(seconds, 3600)
    minutes, seconds = divmod(rest, 60)
    return f"{hours}:{minutes:02d}:{seconds:02d}"


def cmd_sweep(args) -> int:
    """Run the ``sweep`` subcommand; returns the exit status.

    Bad input raises :class:`plantside.errors.PlantsideError`, which the main command
    turns into exit status 2 with the message on stderr.
    """
    from plantside.study.sweep import load_sweep
    from plantside.study.sweep_run import SweepInterruptedError, run_sweep

    sweep = load_sweep(args.sweep)
    if args.plan:
        if args.json:
            print(
                json.dumps(
                    {
                        "title": sweep.title,
                        "cases": sweep.size,
                        "climates": [c.label for c in sweep.climates],
                        "axes": {a.field: list(a.written) for a in sweep.axes},
                    },
                    indent=2,
                )
            )
        else:
            print(sweep.describe())
        return EXIT_OK
    progress = None if args.quiet else ProgressBar()
    if not args.quiet:
        print(sweep.describe(), file=sys.stderr)
    try:
        run = run_sweep(
            sweep,
            Path(args.out),
            workers=args.workers,
            scheduler=args.scheduler,
            batch_size=args.batch_size,
            restart=args.restart,
            retry_failed=args.retry_failed,
            progress=progress,
        )
    except SweepInterruptedError as stopped:
        print(f"\nplantside: {stopped}", file=sys.stderr)
        return EXIT_INTERRUPTED
    written = list(run.files)
    if args.charts:
        ran = run.table[run.table["status"] != "failed"]  # failed cases have no results
        written += _write_charts(sweep, ran, Path(args.out) / "charts")
    if args.json:
        print(
            json.dumps(
                {
                    "cases": run.total,
                    "computed": run.computed,
                    "skipped_already_done": run.skipped,
                    "failed": run.failed,
                    "seconds": round(run.seconds, 3),
                    "written": [str(p) for p in written],
                },
                indent=2,
            )
        )
    else:
        print(
            f"{run.computed} case(s) computed, {run.skipped} already done, "
            f"{run.failed} failed, {run.total} in all ({run.seconds:.1f} s)"
        )
        for path in written:
            print(path)
    if run.failed:
        print(
            f"plantside: {run.failed} of {run.total} case(s) failed; their rows in "
            f"{run.files[1]} have status 'failed' and the error (error_field, "
            "error_message); fix the input and rerun with --retry-failed to run them again",
            file=sys.stderr,
        )
        return EXIT_CASES_FAILED
    return EXIT_OK


def _write_charts(sweep, table, folder: Path) -> list[Path]:
    """The sweep's standard charts as PNG and SVG, in the base scenario's units."""
    from plantside.charts.export import save_chart
    from plantside.charts.sweep import sweep_charts

    charts = sweep_charts(table, [a.column for a in sweep.axes], system=sweep.base.unit_system)
    written = []
    for name, chart in charts.items():
        written += save_chart(chart, folder, name, formats=("png", "svg"), stamp=sweep.title)
    return written


def add_sweep_parser(subparsers) -> None:
    """Add the ``sweep`` subcommand to the main parser's subparsers."""
    sweep = subparsers.add_parser(
        "sweep",
        help="run a batch of cases (axes x climates) into a results folder",
        description="Run every case of a sweep file (a base scenario and the axes to vary) "
        "and write one tidy table, one row per case, as Parquet and CSV. Finished cases are "
        "kept if interrupted; rerunning the same sweep into the same folder skips them.",
    )
    sweep.add_argument("sweep", help="sweep TOML file (a [sweep] table)")
    sweep.add_argument("--out", help="results folder (created)")
    where = sweep.add_mutually_exclusive_group()
    where.add_argument("--workers", type=int, help="local worker processes (default: every core)")
    where.add_argument(
        "--scheduler",
        help="run on a Dask cluster at this scheduler address, e.g. tcp://10.0.0.5:8786 "
        "(needs the 'cluster' extra)",
    )
    sweep.add_argument(
        "--batch-size", type=int, help="cases per task (default: chosen from the case count)"
    )
    again = sweep.add_mutually_exclusive_group()
    again.add_argument(
        "--restart", action="store_true", help="discard finished cases in --out and run all"
    )
    again.add_argument(
        "--retry-failed",
        action="store_true",
        help="run again the cases an earlier run recorded failed (a rerun skips them otherwise)",
    )
    sweep.add_argument(
        "--plan", action="store_true", help="show the climates, axes and case count; run nothing"
    )
    sweep.add_argument(
        "--charts", action="store_true", help="also write the sweep charts (PNG, SVG) in DIR/charts"
    )
    sweep.add_argument("--quiet", action="store_true", help="no progress bar")
    sweep.add_argument("--json", action="store_true", help="machine-readable summary")
    sweep.set_defaults(func=_checked)


def _checked(args) -> int:
    if not args.plan and not args.out:
        from plantside.errors import InputRangeError

        raise InputRangeError("--out", "--out is required (the results folder) unless --plan")
    return cmd_sweep(args)
