"""The chart widget's bundled script: kept on disk, the same as Altair's, never fetched.

Each check runs in a fresh Python process, as a dashboard kernel starts: the state
under test (Altair's class attributes, the modules imported) is per process.
"""

from __future__ import annotations

import hashlib
import json
import os
import subprocess
import sys
import textwrap

import pytest

#: What a kernel reports after taking the bundled script.
_REPORT = textwrap.dedent(
    """
    import hashlib, json, sys
    import altair as alt
    report = {
        "offline": alt.JupyterChart._is_offline,
        "digest": hashlib.sha256(alt.JupyterChart._esm.encode()).hexdigest(),
        "vl_convert_imported": "vl_convert" in sys.modules,
        "rfc3987_syntax_imported": sys.modules.get("rfc3987_syntax") is not None,
    }
    print(json.dumps(report))
    """
)


def _run(code: str, cache, **extra_environment) -> dict:
    environment = {**os.environ, "PLANTSIDE_CACHE_DIR": str(cache), **extra_environment}
    done = subprocess.run(
        [sys.executable, "-c", code + _REPORT],
        capture_output=True,
        text=True,
        env=environment,
        timeout=300,
        check=False,
    )
    assert done.returncode == 0, done.stderr[-3000:]
    return json.loads(done.stdout.strip().splitlines()[-1])


@pytest.fixture(scope="module")
def altair_own_digest(tmp_path_factory):
    """The script Altair's own enable_offline() makes (the reference)."""
    report = _run(
        "import altair as alt\nalt.JupyterChart.enable_offline()\n",
        tmp_path_factory.mktemp("unused"),
    )
    assert report["offline"]
    return report["digest"]


def test_first_kernel_bundles_in_a_child_and_keeps_altair_script(tmp_path, altair_own_digest):
    report = _run(
        "from plantside.dashboard.offline_charts import use_offline_charts\nuse_offline_charts()\n",
        tmp_path,
    )
    assert report["offline"]
    assert report["digest"] == altair_own_digest  # the very script Altair would have made
    # the JavaScript engine ran in the child, not in the kernel (about 105 MB it would keep)
    assert not report["vl_convert_imported"]
    kept = list(tmp_path.glob("chart-widget-*.js"))
    assert len(kept) == 1
    assert hashlib.sha256(kept[0].read_bytes()).hexdigest() == altair_own_digest
    assert not list(tmp_path.glob(".chart-widget-*"))  # no temporary file left behind


def test_later_kernels_read_the_file_without_vl_convert(tmp_path, altair_own_digest):
    _run(
        "from plantside.dashboard.offline_charts import use_offline_charts\nuse_offline_charts()\n",
        tmp_path,
    )
    # vl-convert cannot even be imported now: the script must come from the file
    report = _run(
        "import sys\nsys.modules['vl_convert'] = None\n"
        "from plantside.dashboard.offline_charts import use_offline_charts\n"
        "use_offline_charts()\n",
        tmp_path,
    )
    assert report["offline"]
    assert report["digest"] == altair_own_digest


def test_a_folder_that_cannot_be_written_falls_back_to_altair(tmp_path, altair_own_digest):
    blocked = tmp_path / "a file, not a folder"
    blocked.write_text("")
    report = _run(
        "from plantside.dashboard.offline_charts import use_offline_charts\nuse_offline_charts()\n",
        blocked / "cache",
    )
    assert report["offline"]  # still nothing fetched from a network
    assert report["digest"] == altair_own_digest


def test_cache_folder_follows_the_environment(tmp_path):
    from plantside.dashboard.offline_charts import cache_folder

    assert cache_folder({"PLANTSIDE_CACHE_DIR": str(tmp_path)}) == tmp_path
    assert cache_folder({"XDG_CACHE_HOME": str(tmp_path)}) == tmp_path / "plantside"
    assert cache_folder({}).name == "plantside"


def test_dashboard_kernel_skips_the_iri_parser_and_still_validates_charts(tmp_path):
    # jsonschema imports rfc3987_syntax when installed (0.9 s, 17 MB a kernel); the dashboard
    # package keeps it out, and Altair's validation still refuses a bad spec
    report = _run(
        textwrap.dedent(
            """
            import plantside.dashboard
            import altair as alt
            import pandas as pd
            frame = pd.DataFrame({"x": [1, 2], "y": [3, 4]})
            alt.Chart(frame).mark_line().encode(x="x:Q", y="y:Q").to_dict()
            try:
                alt.Chart(frame).mark_line().encode(x=alt.X("x:Q", bin="yes")).to_dict()
            except Exception as error:
                assert "bin" in str(error)
            else:
                raise AssertionError("an invalid spec was accepted")
            """
        ),
        tmp_path,
    )
    assert not report["rfc3987_syntax_imported"]
