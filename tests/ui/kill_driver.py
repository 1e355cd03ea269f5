"""Run by the kill test in its own process: drive the app, say when a field shows saved, wait.

    python kill_driver.py DB SURVEY_ID
"""

from __future__ import annotations

import asyncio
import sys
from pathlib import Path

sys.path.insert(0, str(Path(__file__).resolve().parent))

from drive import press, started, type_in

from triage.ui.app import build_app


async def main(db: str, sid: str) -> None:
    app = build_app(Path(db), open_survey=sid, blink=False)
    async with started(app) as pilot:
        await press(pilot, "f5")
        f = await type_in(pilot, "s-height", "3.9")
        if f.status_text.startswith("✓ saved"):
            print("SHOWN SAVED", flush=True)
        else:
            print("NOT SAVED " + f.status_text, flush=True)
        # type into another field, never accepted; say what the field holds, then wait to be
        # killed with that typing on screen
        notes = await type_in(pilot, "s-notes", "half typed", enter=False)
        print(f"TYPED {notes.input.value}|{notes.status_text}", flush=True)
        await asyncio.sleep(120)


if __name__ == "__main__":
    asyncio.run(main(sys.argv[1], sys.argv[2]))
