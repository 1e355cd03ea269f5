"""The package list, found rather than written by hand; everything else is in pyproject.toml.

`forms/` and `sample_surveys/` stay at the top of the repository and ship inside the wheel as
`triage._data.forms` and `triage._data.sample_surveys` (`[tool.setuptools.package-dir]`).
pyproject's `packages.find` cannot name a package whose folder sits outside its parent's, so the
search is made here: every folder under `triage/` (data folders such as `report/fonts` included,
so setuptools does not warn about them), plus the two mapped folders and their subfolders.
"""

from setuptools import find_namespace_packages, setup

MAPPED = {"triage._data.forms": "forms", "triage._data.sample_surveys": "sample_surveys"}
SKIP = ["*__pycache__*"]

packages = find_namespace_packages(include=["triage", "triage.*"], exclude=SKIP)
for name, folder in MAPPED.items():
    packages += [name, *(f"{name}.{sub}" for sub in find_namespace_packages(folder, exclude=SKIP))]

setup(packages=packages)
