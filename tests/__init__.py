"""Test suite of sverdrup_kit (a package so that the repository root, and with it
``data_recipes``, is importable however pytest is started)."""
