"""Tests of sverdrup_kit.physics."""
