"""The screens of the app, one module and one stylesheet each."""
