"""The package as a user gets it: built offline into a wheel, installed, and run from there.

forms/ and sample_surveys/ ship inside the wheel as triage._data.forms / .sample_surveys; the
source distribution carries the tests and docs. The test builds the sdist from this checkout,
the wheel from that sdist (so a file the sdist forgets fails here), installs the wheel into a
fresh virtual environment and, from a folder outside the checkout, runs the loading path of
`triage demo` (the sample surveys found inside the installed package and loaded into a scratch
database, as the demo's start-up worker does, without opening the screens) and
`triage form rc_frame -o x.pdf`.
"""

from __future__ import annotations

import json
import os
import re
import subprocess
import sys
import tarfile
import zipfile
from importlib import resources
from pathlib import Path

import pytest
from pypdf import PdfReader

from triage.resources import forms_dir, samples_dir

ROOT = Path(__file__).resolve().parents[2]
SAMPLES = sorted(p.name for p in (ROOT / "sample_surveys").glob("*.json"))

# What setuptools says when the configuration is wrong or going out of date (a data folder
# missing from the package list, a deprecated licence table, ...).
BUILD_WARNING = re.compile(r"(Setuptools\w*Warning|_Warning|is absent from the `packages`)")

DEMO_LOAD = """
import json, sys, tempfile
from pathlib import Path
import triage
from triage.resources import samples_dir
from triage.ui.data import FieldData

folder = samples_dir()
fd = FieldData(Path(tempfile.mkdtemp()) / "demo.db")
try:
    loaded = fd.load_samples(folder, "demo")
    names = sorted(r.building for r in fd.surveys())
finally:
    fd.close()
print(json.dumps({"package": triage.__file__, "samples": str(folder),
                  "files": sorted(p.name for p in folder.glob("*.json")),
                  "loaded": loaded, "names": names}))
"""


def _run(cmd: list[str], cwd: Path, env: dict[str, str] | None = None) -> tuple[str, str]:
    done = subprocess.run(cmd, cwd=cwd, env=env, capture_output=True, text=True, timeout=120)
    assert done.returncode == 0, f"{cmd[:3]} failed:\n{done.stdout[-2000:]}\n{done.stderr[-2000:]}"
    return done.stdout, done.stderr


def _builder() -> str:
    """An interpreter whose setuptools meets pyproject's build requirement (>= 77).

    Build isolation would fetch one from the network; offline, the test uses this interpreter's,
    or the base interpreter's when a virtual environment carries an older copy of its own.
    """
    check = "import setuptools, sys; sys.exit(int(setuptools.__version__.split('.')[0]) < 77)"
    for py in dict.fromkeys([sys.executable, getattr(sys, "_base_executable", sys.executable)]):
        if subprocess.run([py, "-c", check], capture_output=True).returncode == 0:
            return py
    pytest.fail("no interpreter here has setuptools >= 77 (pip install -e '.[test]' brings it)")


def _hook(hook: str, source: Path, out: Path) -> tuple[Path, str]:
    """Call a PEP 517 hook of setuptools in `source`, in a fresh interpreter, no isolation."""
    code = f"import sys; from setuptools import build_meta as b; print(b.{hook}(sys.argv[1]))"
    stdout, stderr = _run([_builder(), "-c", code, str(out)], cwd=source)
    return out / stdout.strip().splitlines()[-1], stdout + stderr


def test_data_folders_are_regular_packages() -> None:
    assert (ROOT / "forms" / "__init__.py").is_file()
    assert (ROOT / "sample_surveys" / "__init__.py").is_file()


def test_resources_find_real_folders_holding_the_files() -> None:
    for folder, pattern in ((forms_dir(), "*.toml"), (samples_dir(), "*.json")):
        assert folder.is_dir() and list(folder.glob(pattern))
    try:
        found = resources.files("triage._data.forms")
    except ModuleNotFoundError:  # a plain source checkout, not installed
        return
    assert Path(str(found)).is_dir()


@pytest.mark.slow
def test_wheel_built_offline_installs_and_runs_demo_loading_and_form(tmp_path: Path) -> None:
    dist = tmp_path / "dist"
    dist.mkdir()

    # 1. the source distribution, from this checkout: it carries tests, docs and the licence
    sdist, log = _hook("build_sdist", ROOT, dist)
    assert not BUILD_WARNING.search(log), log
    with tarfile.open(sdist) as tar:
        members = {m.split("/", 1)[1] for m in tar.getnames() if "/" in m}
        tar.extractall(tmp_path / "src", filter="data")
    for needed in ("LICENSE", "CHANGELOG.md", "docs/method.md", "mkdocs.yml",
                   "tests/forms/test_packaging.py", "tests/conftest.py", "triage/py.typed",
                   "forms/rc_frame.toml", *(f"sample_surveys/{n}" for n in SAMPLES)):
        assert needed in members, f"{needed} missing from the sdist"

    # 2. the wheel, from the unpacked sdist, without build isolation (offline) and without
    #    a warning from setuptools about the package list or the metadata
    wheel, log = _hook("build_wheel", tmp_path / "src" / sdist.name.removesuffix(".tar.gz"),
                       dist)
    assert not BUILD_WARNING.search(log), log
    assert wheel.suffix == ".whl" and wheel.parent == dist and zipfile.is_zipfile(wheel)
    with zipfile.ZipFile(wheel) as zf:
        names = set(zf.namelist())
        meta = zf.read(next(n for n in names if n.endswith(".dist-info/METADATA"))).decode()
    assert "triage/py.typed" in names
    assert "triage/report/fonts/DejaVuSans.ttf" in names
    assert "triage/_data/sample_surveys/img/school_n4.jpg" in names
    assert "License-Expression: MIT" in meta
    assert not any(n.startswith(("tests/", "bench/", "forms/", "sample_surveys/")) for n in names)

    # 3. a fresh environment that sees the installed dependencies but not this checkout
    venv = tmp_path / "venv"
    _run([sys.executable, "-m", "venv", "--system-site-packages", "--without-pip", str(venv)],
         cwd=tmp_path)
    py = venv / "bin" / "python"
    _run([sys.executable, "-m", "pip", "--python", str(py), "install", "-q", "--no-deps",
          "--no-index", "--ignore-installed", str(wheel)], cwd=tmp_path)
    work = tmp_path / "elsewhere"
    work.mkdir()
    env = {k: v for k, v in os.environ.items() if k != "PYTHONPATH"}
    env["TRIAGE_HOME"] = str(tmp_path / "home")

    # 4. the demo's loading: every sample found inside the installed package and stored
    out = json.loads(_run([str(py), "-c", DEMO_LOAD], cwd=work, env=env)[0].splitlines()[-1])
    site = str(venv / "lib")
    assert out["package"].startswith(site), out["package"]
    assert out["samples"].startswith(site), out["samples"]
    assert out["files"] == SAMPLES
    assert out["loaded"] == len(SAMPLES) == len(out["names"])
    assert "Saltmarsh Road School, classroom block B" in out["names"]

    # 5. the paper form, by the installed command
    _run([str(venv / "bin" / "triage"), "form", "rc_frame", "-o", "x.pdf"], cwd=work, env=env)
    pdf = work / "x.pdf"
    assert pdf.read_bytes().startswith(b"%PDF-")
    text = " ".join(page.extract_text() for page in PdfReader(pdf).pages)
    assert "Reinforced concrete frame" in text
