"""A sweep's results folder: the parts, the manifest and the tidy table.

Only the parent process writes here. Each finished batch becomes one Parquet part in
``<out>/parts/`` (through a temporary file and :func:`os.replace`, so a part exists
whole or not at all), then ``<out>/manifest.json`` is rewritten the same way. The
parts' ``case_id`` and ``status`` say which cases are done (:meth:`_Folder.statuses`);
:func:`results_table` gathers them into one row per case.
"""

from __future__ import annotations

import hashlib
import json
import os
from datetime import UTC, datetime
from pathlib import Path

import pandas as pd

from plantside import __version__
from plantside.errors import InputFileError
from plantside.study.sweep_cases import Sweep
from plantside.study.sweep_worker import STATUS_COLUMNS, case_row, headline_columns, typed_table

__all__ = ["MANIFEST_NAME", "PARTS_FOLDER", "RESULTS_NAME", "results_table"]


MANIFEST_NAME = "manifest.json"
PARTS_FOLDER = "parts"
RESULTS_NAME = "sweep_results"


# ---------------------------------------------------------------------------------------
# the results folder
# ---------------------------------------------------------------------------------------
class _Folder:
    """``out/``: parts, manifest and the final table."""

    def __init__(self, out: Path, sweep: Sweep, restart: bool):
        self.out = Path(out)
        self.parts = self.out / PARTS_FOLDER
        self.sweep = sweep
        manifest = self.out / MANIFEST_NAME
        if restart:
            if self.parts.is_dir():
                for part in self.parts.glob("part-*.parquet"):
                    part.unlink()
            manifest.unlink(missing_ok=True)
        if manifest.is_file():
            try:
                old = json.loads(manifest.read_text(encoding="utf-8"))
            except (ValueError, UnicodeDecodeError) as error:
                raise InputFileError(
                    str(manifest), [f"not a readable manifest ({error})"]
                ) from None
            if old.get("base_fingerprint") != sweep.fingerprint:
                raise InputFileError(
                    str(manifest),
                    [
                        "this folder holds results of another sweep (its base scenario, "
                        "input files or the plantside model differ); choose another output "
                        "folder, or restart to discard them"
                    ],
                )
        elif self.parts.is_dir() and any(self.parts.glob("part-*.parquet")):
            raise InputFileError(
                str(self.out), ["parts found without a manifest; restart to discard them"]
            )
        self.parts.mkdir(parents=True, exist_ok=True)
        self.part_files: list[str] = sorted(p.name for p in self.parts.glob("part-*.parquet"))

    def statuses(self) -> dict[str, str]:
        """``case_id`` -> ``ok`` or ``failed`` of every case in the parts (the latest row)."""
        status: dict[str, str] = {}
        for path in _parts_in_order(self.out):
            frame = pd.read_parquet(path, columns=["case_id", "status"])
            status.update(zip(frame["case_id"], frame["status"], strict=True))
        return status

    def write_part(self, frame: pd.DataFrame) -> Path:
        first = int(frame["case_index"].min())
        tag = hashlib.sha256(",".join(frame["case_id"]).encode("ascii")).hexdigest()[:10]
        path = self.parts / f"part-{first:07d}-{tag}.parquet"
        temporary = path.with_suffix(".tmp")
        frame.to_parquet(temporary, index=False)
        os.replace(temporary, path)
        self.part_files.append(path.name)
        return path

    def write_manifest(self, done: int, state: str, failed: int = 0) -> None:
        sweep = self.sweep
        data = {
            "format": "plantside sweep results",
            "plantside_version": __version__,
            "sweep": sweep.source,
            "title": sweep.title,
            "base_scenario": sweep.base.source,
            "base_fingerprint": sweep.fingerprint,
            "unit_system_of_sweep_file": str(sweep.base.unit_system),
            "values_in_table": "SI (column names carry the unit)",
            "climates": [c.label for c in sweep.climates],
            "axes": [
                {"field": a.field, "column": a.column, "values_as_written": list(a.written)}
                for a in sweep.axes
            ],
            "cases_total": sweep.size,
            "cases_done": done,
            "cases_failed": failed,
            "state": state,
            "parts": sorted(self.part_files),
            "updated": datetime.now(UTC).isoformat(timespec="seconds"),
        }
        path = self.out / MANIFEST_NAME
        temporary = path.with_suffix(".tmp")
        temporary.write_text(json.dumps(data, indent=2), encoding="utf-8")
        os.replace(temporary, path)


def _parts_in_order(out) -> list[Path]:
    """The parts in ``out`` in the order they were written (a retried case's row last)."""
    parts = (Path(out) / PARTS_FOLDER).glob("part-*.parquet")
    return sorted(parts, key=lambda p: (p.stat().st_mtime_ns, p.name))


def results_table(out, sweep: Sweep) -> pd.DataFrame:
    """The tidy table of a sweep from the parts in ``out`` (cases done so far).

    One row per finished case of ``sweep``, in case order: ``case_index``, ``case_id``,
    ``climate``, one column per axis (SI; the name carries the unit), the headline
    results of :func:`case_headlines`, then ``status`` (``ok`` or ``failed``),
    ``error_field`` and ``error_message`` (a failed case has no results). A case run
    more than once (a failed case retried) has the row of its latest run. Parts of
    cases that are no longer in the sweep (e.g. an axis value since removed) are left
    out.
    """
    parts = _parts_in_order(out)
    template = typed_table(pd.DataFrame(), sweep)
    if not parts:
        return template
    frame = pd.concat([pd.read_parquet(p) for p in parts], ignore_index=True)
    frame = frame.drop_duplicates(subset="case_id", keep="last")
    index = {case.case_id: case.index for case in sweep.cases}
    frame = frame[frame["case_id"].isin(index)].copy()
    frame["case_index"] = frame["case_id"].map(index)
    # varied values come from the sweep itself (authoritative), results from the parts
    cases = pd.DataFrame([case_row(sweep, sweep.cases[i]) for i in frame["case_index"]])
    results = frame[["case_id", *headline_columns(sweep.base, sweep.water_side), *STATUS_COLUMNS]]
    table = cases.merge(results, on="case_id", how="left") if len(cases) else template
    return typed_table(table.sort_values("case_index").reset_index(drop=True), sweep)
