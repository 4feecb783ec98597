"""presets/ must be found from an editable install (this checkout) and from a wheel.

Common practice, no source: a tool that ships data files must find them however it is
installed; the wheel maps the top-level presets/ to screening/presets (pyproject.toml).
"""

import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
PRESET_FILES = (
    "fills.toml",
    "reinforcement.toml",
    "factor-sets.toml",
    "rules.toml",
    "demo-corridor.toml",
)


def test_presets_found_from_checkout() -> None:
    from screening.model.presets import presets_root

    root = presets_root()
    for name in PRESET_FILES:
        assert (root / name).is_file(), name


@pytest.fixture(scope="module")
def wheel(tmp_path_factory: pytest.TempPathFactory) -> Path:
    out = tmp_path_factory.mktemp("wheel")
    proc = subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(out), str(ROOT)],
        capture_output=True,
        text=True,
    )
    if proc.returncode != 0:
        pytest.skip(f"could not build a wheel here: {proc.stderr[-300:]}")
    return next(out.glob("wallscreen-*.whl"))


def test_wheel_carries_presets_and_stylesheet(wheel: Path) -> None:
    names = set(zipfile.ZipFile(wheel).namelist())
    for name in PRESET_FILES:
        assert f"screening/presets/{name}" in names, name
    assert any(n.startswith("screening/tui/") and n.endswith(".tcss") for n in names)


def test_wheel_carries_every_package(wheel: Path) -> None:
    """Packages are found, not listed (setup.py): a new folder under screening/ ships as is."""
    names = set(zipfile.ZipFile(wheel).namelist())
    packages = sorted((ROOT / "screening").rglob("__init__.py"))
    assert len(packages) >= 10
    for init in packages:
        assert init.relative_to(ROOT).as_posix() in names, init


def test_presets_found_from_wheel_contents(wheel: Path, tmp_path: Path) -> None:
    """Unpack the wheel (no install needed) and import from there, away from the checkout."""
    zipfile.ZipFile(wheel).extractall(tmp_path)
    code = (
        "import sys; sys.path.insert(0, sys.argv[1]);"
        "from screening.model.presets import presets_root, load_presets;"
        "r = presets_root(); p = load_presets();"
        "print(str(r).startswith(sys.argv[1]), len(p.fills) >= 5)"
    )
    out = subprocess.run(
        [sys.executable, "-c", code, str(tmp_path)], capture_output=True, text=True, cwd=tmp_path
    )
    assert out.stdout.split() == ["True", "True"], out.stderr
