"""The pieces every table model shares: a frozen model and a table's source."""

from __future__ import annotations

from typing import Literal

from pydantic import BaseModel, ConfigDict

Status = Literal["checked", "secondary", "memory"]


class Frozen(BaseModel):
    """A table's model: read-only, no unknown keys."""

    model_config = ConfigDict(frozen=True, extra="forbid")


class Source(Frozen):
    """Where a table's figures come from."""

    document: str
    edition: str
    table: str
    status: Status
    status_note: str = ""

    def cite(self) -> str:
        """A short citation: document, edition, table; 'from memory' where it is."""
        text = f"{self.document} ({self.edition}) {self.table}"
        return text + (", from memory" if self.status == "memory" else "")
