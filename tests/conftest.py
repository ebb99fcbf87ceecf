"""Shared helpers of the test suite: job files written from text, and paths of the bundled examples."""

from __future__ import annotations

import textwrap
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
EXAMPLES = ROOT / "examples"
DEMO = EXAMPLES / "a_frame_gantry.toml"


@pytest.fixture
def write_job(tmp_path):
    """Write a job file from (dedented) TOML text into a temporary folder; returns its path."""

    def _write(text: str, name: str = "job.toml") -> Path:
        path = tmp_path / name
        path.write_text(textwrap.dedent(text), encoding="utf-8")
        return path

    return _write


@pytest.fixture
def make_job(write_job):
    """Read a job from TOML text through the real job-file reader (pinchk.jobfile.load_job)."""
    from pinchk.jobfile import load_job

    def _make(text: str):
        return load_job(write_job(text))

    return _make
