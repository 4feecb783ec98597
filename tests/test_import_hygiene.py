"""The engine, the model and the store are headless: importing them pulls in no Textual.

Common practice, no source: a numerical core that imports a UI toolkit cannot be scripted
or tested without it (DESIGN.md: "engine/ imports neither Textual nor files").
"""

import subprocess
import sys

import pytest


@pytest.mark.parametrize(
    "module", ["screening.engine", "screening.model", "screening.store", "screening.model.presets"]
)
def test_headless_modules_do_not_import_textual(module: str) -> None:
    code = f"import sys, {module}; print('textual' in sys.modules)"
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "False", out.stderr


def test_cli_help_does_not_import_textual() -> None:
    code = (
        "import sys; from screening import cli\n"
        "try:\n    cli.main(['check', '--help'])\nexcept SystemExit:\n    pass\n"
        "print('textual' in sys.modules)"
    )
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip().splitlines()[-1] == "False", out.stderr
