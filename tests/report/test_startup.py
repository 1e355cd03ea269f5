"""pyHanko (and rfc8785) load only when a report is signed or verified: start-up stays fast."""

from __future__ import annotations

import subprocess
import sys


def test_help_loads_no_signature_library():
    out = subprocess.run([sys.executable, "-X", "importtime", "-m", "triage", "--help"],
                         capture_output=True, text=True, check=True, timeout=60)
    modules = {line.rsplit("|", 1)[-1].strip() for line in out.stderr.splitlines()
               if line.startswith("import time:")}
    assert "triage.cli" in modules  # the import log is what we think it is
    loaded = {m.split(".")[0] for m in modules}
    assert not loaded & {"pyhanko", "pyhanko_certvalidator", "rfc8785", "asn1crypto"}


def test_report_modules_load_pyhanko_only_when_used():
    code = ("import sys, triage.report, triage.report.keys, triage.report.verify, "
            "triage.report.signing, triage.report.pades; "
            "print(sorted(m for m in ('pyhanko', 'rfc8785') if m in sys.modules))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True,
                         check=True, timeout=60)
    assert out.stdout.strip() == "[]"
