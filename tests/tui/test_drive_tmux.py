"""Run ``drive_tmux.sh``: the real app in a real terminal (tmux), driven by keys."""

from __future__ import annotations

import os
import shutil
import subprocess
import sys
from pathlib import Path

import pytest

SCRIPT = Path(__file__).with_name("drive_tmux.sh")


@pytest.mark.skipif(shutil.which("tmux") is None, reason="tmux is not installed")
def test_drive_the_real_app_in_tmux(tmp_path: Path):
    env = dict(os.environ, PYTHON=sys.executable, OUT=str(tmp_path / "screens"))
    run = subprocess.run(
        ["bash", str(SCRIPT)], env=env, capture_output=True, text=True, timeout=300
    )
    assert run.returncode == 0, run.stdout[-4000:] + run.stderr[-2000:]
    assert run.stdout.startswith("OK")
    detail = (tmp_path / "screens" / "5-detail.txt").read_text(encoding="utf-8")
    assert "Why this verdict" in detail and "█" in detail
