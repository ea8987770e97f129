"""Tests of sverdrup_kit.geometry."""
