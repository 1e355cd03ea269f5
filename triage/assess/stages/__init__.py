"""The stages of the assessment, one module each.

In the order `triage.assess.engine.assess` runs them: drift, members, hazards and level,
governing, probability, advice.
"""
