"""Field-form definitions (TOML), shipped as triage._data.forms; read by triage.forms."""
