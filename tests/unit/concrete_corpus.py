"""A seeded corpus of concrete surveys (rc_frame, rc_wall) that use none of the capacity keys,
and the digest of what the engine says of each, for the test that the residual capacity of
steel frames and walls left concrete as it was (tests/unit/test_capacity_engine.py).

`python -m tests.unit.concrete_corpus OUT.json` writes the digests with the engine it imports;
the file in tests/unit/data/ was written by engine 0.2.0, before FEMA 352 and FEMA 306 came in,
and written again when the text values came to name keys in words (every other key of the 300
assessments was checked identical then: only `reasons`, `notes`, `defaulted`, `settled_by`
and `measure_next`'s `why` and `member` differed).
"""

from __future__ import annotations

import hashlib
import json
import random
import sys
from typing import Any

from tests.helpers import reading, storey, survey_dict

N = 300
SIGNS = {"column": ["cover_spalling", "bar_exposed", "bar_buckled", "core_crushed"],
         "wall": ["cover_spalling", "bar_exposed", "core_crushed", "vertical_shortening"]}
# Keys and values the capacity work added: left out of the digest, so it compares the rest.
NEW_TOP = ("residual_capacity",)
NEW_MEMBER = ("inspected", "connection_type", "connection_index", "mode", "severity",
              "lambda_q")


def corpus() -> list[dict[str, Any]]:
    """N concrete surveys, the same every run."""
    rng = random.Random(20261202)
    out = []
    for i in range(N):
        sx, sy = rng.choice(["rc_frame", "rc_wall"]), rng.choice(["rc_frame", "rc_wall"])
        storeys = []
        for s in range(rng.randint(1, 3)):
            readings = [reading(d, round(rng.uniform(-6, 6), 1), rng.choice([1500.0, 2500.0]),
                                rng.choice([0.5, 1.0, 2.0]))
                        for d in ("x", "y") for _ in range(rng.randint(0, 2))]
            members = []
            for _ in range(rng.randint(0, 4)):
                kind = rng.choice(["column", "column", "wall", "beam"])
                m: dict[str, Any] = {"kind": kind, "count": rng.randint(1, 15)}
                if rng.random() < 0.6:
                    m["crack_mm"] = round(rng.choice([rng.uniform(0, 0.4), rng.uniform(0, 2.5)]), 2)
                    m["crack_sd_mm"] = rng.choice([0.05, 0.1, 0.3])
                if kind in SIGNS and rng.random() < 0.2:
                    m["signs"] = [rng.choice(SIGNS[kind])]
                if kind == "column" and rng.random() < 0.3:
                    m["ductility"] = "brittle"
                if kind == "wall" and rng.random() < 0.5:
                    m["dir"] = rng.choice(["x", "y"])
                    m["weight"] = rng.choice([1.0, 2.0, 3.5])
                if rng.random() < 0.05:
                    m["damage_class"] = rng.choice(["II", "IV", "V"])
                    m["override_reason"] = "seen close up"
                members.append(m)
            storeys.append(storey(str(s + 1), readings, members))
        out.append(survey_dict(storeys, sx=sx, sy=sy, name=f"Corpus {i}"))
    return out


def digest(assessment: dict[str, Any]) -> str:
    """SHA-256 of an assessment without the engine's version, assumptions and sources, and
    without the keys the capacity work added."""
    a = {k: v for k, v in assessment.items()
         if k not in ("engine", "sources", *NEW_TOP)}
    for st in a["storeys"]:
        for m in st["members"]:
            for k in NEW_MEMBER:
                m.pop(k, None)
    text = json.dumps(a, sort_keys=True, ensure_ascii=False)
    return hashlib.sha256(text.encode()).hexdigest()


def digests() -> list[str]:
    """The digest of the engine's assessment of each survey of the corpus."""
    from triage.assess import assess
    from triage.model import parse_survey

    return [digest(assess(parse_survey(d)).model_dump(mode="json")) for d in corpus()]


if __name__ == "__main__":
    with open(sys.argv[1], "w", encoding="utf-8") as f:
        json.dump(digests(), f, indent=0)
        f.write("\n")
