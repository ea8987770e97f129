"""Run a CF check (cf:1.8 unless told) of the general-purpose IOOS compliance checker on a file, offline.

The checker (PyPI ``compliance-checker``) ships its CF standard-name table; it reaches the
network only for a table version named in ``standard_name_vocabulary``, for remote paths and
for taxon identifiers, none of which our files use. The socket guard below turns any attempt
into a failure instead of a silent wait.
"""

import socket

import pytest


def cf_problems(path, monkeypatch, suite="cf:1.8"):
    """Errors and warnings (failed checks of high or medium weight) and checker exceptions."""
    suite_mod = pytest.importorskip("compliance_checker.suite")

    def no_network(*args, **kwargs):
        raise AssertionError("the CF check tried to reach the network")

    monkeypatch.setattr(socket.socket, "connect", no_network)
    monkeypatch.setattr(socket, "create_connection", no_network)
    suite_mod.CheckSuite.load_all_available_checkers()
    checker = suite_mod.CheckSuite()
    ds = checker.load_dataset(str(path))
    groups, crashed = checker.run_all(ds, [suite])[suite]
    ds.close()
    problems = [f"{r.name}: {'; '.join(r.msgs)}" for r in groups
                if r.weight >= 2 and r.value[0] != r.value[1]]
    problems += [f"checker exception in {name}: {err[0]}" for name, err in crashed.items()]
    return problems
