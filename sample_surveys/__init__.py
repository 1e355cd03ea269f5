"""Demo surveys of the invented town of Kōwhai Bay, shipped as triage._data.sample_surveys."""
