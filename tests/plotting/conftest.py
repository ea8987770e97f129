"""Fixtures of the figure tests: the synthetic world, a stand-in result, and a strict mode."""

import socket
import warnings

import matplotlib

matplotlib.use("Agg")

import matplotlib.pyplot as plt  # noqa: E402
import pytest  # noqa: E402

from sverdrup_kit import synthetic  # noqa: E402

from ._results import fake_sverdrup  # noqa: E402


@pytest.fixture(scope="module")
def world():
    return synthetic.load_world()


@pytest.fixture(scope="module")
def result(world):
    return fake_sverdrup(world)


@pytest.fixture
def strict(monkeypatch):
    """Any warning fails the test, and any attempt to reach the network raises."""

    def no_network(*args, **kwargs):
        raise OSError("tests must not touch the network")

    monkeypatch.setattr(socket.socket, "connect", no_network)
    monkeypatch.setattr(socket, "create_connection", no_network)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        yield
    plt.close("all")
