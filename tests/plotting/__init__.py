"""Tests of sverdrup_kit.plotting."""
