"""Member classes, damage floors and the member stage pinned at their edges.

The JBDPA crack bounds and eta are from memory (tests/reference/test_jbdpa_residual_capacity.py);
the floors per class and the collapse rule are ours (docs/method.md).
"""

from __future__ import annotations

import pytest

from triage.assess import damage


@pytest.mark.parametrize(("name", "index"), [(None, 0), ("I", 1), ("III", 3), ("V", 5)])
def test_a_class_name_and_its_index_both_ways(name, index):
    assert damage.class_index(name) == index
    assert damage.class_name(index) == name
