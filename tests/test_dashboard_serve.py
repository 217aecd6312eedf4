"""The serving entry point: the Voila command it builds and what it prints.

Voila options checked against Voila 0.5's own option list (``voila --help-all``):
``--Voila.ip``, ``--port``, ``--token``, ``--preheat_kernel``, ``--pool_size`` and the
kernel manager's ``cull_idle_timeout`` / ``cull_interval``.
"""

from __future__ import annotations

import sys
from pathlib import Path

import pytest
from plantside.dashboard import serve
from plantside.dashboard.download import MAX_DOWNLOAD_BYTES, BrowserDownload, safe_filename

DASHBOARDS = Path(__file__).resolve().parents[1] / "dashboards"


def test_local_command_binds_loopback_with_prestarted_kernels_and_culling():
    command = serve.voila_command(DASHBOARDS, port=9001, pool_size=2, cull_idle_timeout=600)
    assert command[:3] == [sys.executable, "-m", "voila"]
    assert str(DASHBOARDS) in command
    assert "--port=9001" in command
    assert "--Voila.ip=127.0.0.1" in command
    assert "--preheat_kernel=True" in command and "--pool_size=2" in command
    assert "--MappingKernelManager.cull_idle_timeout=600" in command
    assert any(part.startswith("--MappingKernelManager.cull_interval=") for part in command)
    assert not any(part.startswith("--token") for part in command)


def test_lan_command_binds_all_interfaces_and_needs_a_token():
    with pytest.raises(ValueError, match="token"):
        serve.voila_command(DASHBOARDS, lan=True)
    command = serve.voila_command(DASHBOARDS, lan=True, token="s3cret-token")
    assert "--Voila.ip=0.0.0.0" in command
    assert "--token=s3cret-token" in command


@pytest.mark.parametrize(("option", "value"), [("port", 80), ("port", 70000), ("pool_size", 9)])
def test_bad_options_are_refused(option, value):
    with pytest.raises(ValueError):
        serve.voila_command(DASHBOARDS, **{option: value})


def test_dry_run_prints_urls_token_and_security_note(capsys):
    assert serve.main(["--lan", "--port", "9002", "--dry-run"]) == 0
    out = capsys.readouterr().out
    assert serve.SECURITY_NOTE in out
    assert "/voila/render/air_handler.ipynb?token=" in out
    assert "/voila/render/plant.ipynb?token=" in out
    assert "--Voila.ip=0.0.0.0" in out
    assert "licensed engineer" in out


def test_missing_scenario_file_is_a_clear_error(capsys, tmp_path):
    assert serve.main(["--scenario", str(tmp_path / "nope.toml"), "--dry-run"]) == 2
    assert "nope.toml" in capsys.readouterr().err


def test_download_names_are_labels_never_paths():
    assert safe_filename("../../etc/passwd") == "_.._etc_passwd"
    assert "/" not in safe_filename("a/b\\c:d.png")
    assert safe_filename("") == "plantside-export"
    assert safe_filename("Quillon Row 2 %.csv") == "Quillon Row 2 _.csv"


def test_download_sends_bytes_in_one_message_and_refuses_huge_files():
    widget = BrowserDownload()
    sent = []
    widget.send = lambda content, buffers=None: sent.append((content, buffers))
    name = widget.send_file(b"\x89PNG...", "chart.png", "image/png")
    assert name == "chart.png"
    content, buffers = sent[0]
    assert content == {"kind": "plantside-download", "filename": "chart.png", "mime": "image/png"}
    assert buffers == [b"\x89PNG..."]
    with pytest.raises(ValueError, match="limit"):
        widget.send_file(b"0" * (MAX_DOWNLOAD_BYTES + 1), "big.csv")
    widget.delivered = -5  # a page cannot set a nonsense count
    assert widget.delivered == 0
