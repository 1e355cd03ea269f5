"""triage: post-earthquake building inspection, from field readings to an indicative tier.

The tier this package computes is indicative only: the licensed engineer of record and the
local building authority make the binding decision, under local codes.
"""

__version__ = "0.3.0"
