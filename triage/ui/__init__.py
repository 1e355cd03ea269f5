"""The field screens: a Textual app over the store and the assessment.

The only package that imports `textual`. Build the app with `triage.ui.app.build_app`; the
command and the tests use the same factory. The screens never write SQL: every read and edit
goes through `triage.ui.data`, the one adapter onto `triage.store`.
"""
