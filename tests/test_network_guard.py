"""The no-network guard itself must bite, or the offline promise is untested."""

import socket

import pytest

from tests.conftest import NetworkBlocked


def test_outbound_connection_is_refused():
    s = socket.socket(socket.AF_INET, socket.SOCK_STREAM)
    try:
        with pytest.raises(NetworkBlocked):
            s.connect(("93.184.216.34", 80))  # any public address (common practice: TEST-NET is not enough)
    finally:
        s.close()


def test_name_resolution_is_refused():
    with pytest.raises(NetworkBlocked):
        socket.getaddrinfo("example.org", 443)
