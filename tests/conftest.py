"""Test-wide set-up: no network, a private cache folder, warnings are errors."""

from __future__ import annotations

import ipaddress
import socket

import pytest


class NetworkBlocked(RuntimeError):
    pass


def _is_loopback(address) -> bool:
    host = address[0] if isinstance(address, tuple) else address
    if isinstance(host, bytes):
        host = host.decode()
    if host in ("localhost", "", None):
        return True
    try:
        return ipaddress.ip_address(host).is_loopback
    except ValueError:
        return False  # a host name other than localhost would need DNS


@pytest.fixture(autouse=True, scope="session")
def _no_network():
    """Every test runs with outbound connections made impossible (loopback stays open)."""
    real_connect = socket.socket.connect
    real_connect_ex = socket.socket.connect_ex
    real_getaddrinfo = socket.getaddrinfo

    def connect(self, address):
        if self.family in (socket.AF_INET, socket.AF_INET6) and not _is_loopback(address):
            raise NetworkBlocked(f"test tried the network: {address!r}")
        return real_connect(self, address)

    def connect_ex(self, address):
        if self.family in (socket.AF_INET, socket.AF_INET6) and not _is_loopback(address):
            raise NetworkBlocked(f"test tried the network: {address!r}")
        return real_connect_ex(self, address)

    def getaddrinfo(host, *args, **kwargs):
        if not _is_loopback(host):
            raise NetworkBlocked(f"test tried to resolve {host!r}")
        return real_getaddrinfo(host, *args, **kwargs)

    socket.socket.connect = connect
    socket.socket.connect_ex = connect_ex
    socket.getaddrinfo = getaddrinfo
    yield
    socket.socket.connect = real_connect
    socket.socket.connect_ex = real_connect_ex
    socket.getaddrinfo = real_getaddrinfo


@pytest.fixture(autouse=True, scope="session")
def _private_cache(tmp_path_factory):
    """Caches (star catalogue, land mask) go to one folder per test session."""
    import os

    mp = pytest.MonkeyPatch()
    mp.setenv("DOMEGEN_CACHE_DIR", str(tmp_path_factory.mktemp("cache")))
    yield
    mp.undo()
