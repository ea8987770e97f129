"""Tests of sverdrup_kit.io."""
