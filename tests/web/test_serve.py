"""``cutplan serve``: loopback by default, a warning for any other host, clean errors."""

import socket

import pytest
from click.testing import CliRunner

from cutplan.cli import cli
from cutplan.web import server


@pytest.mark.parametrize(("host", "loopback"), [
    # RFC 5735 section 3: 127.0.0.0/8 is loopback; RFC 4291 section 2.5.3: ::1 is loopback
    ("127.0.0.1", True), ("127.0.0.2", True), ("::1", True), ("[::1]", True), ("localhost", True),
    ("0.0.0.0", False), ("192.168.1.20", False), ("::", False), ("classroom.local", False),
])
def test_loopback_hosts(host, loopback):
    assert server.is_loopback(host) is loopback
    assert (server.exposure_warning(host) is None) is loopback


def test_serve_defaults_to_loopback_and_warns_for_other_hosts(monkeypatch):
    calls = []
    monkeypatch.setattr(server, "serve", lambda *args, **kw: calls.append(args))
    result = CliRunner().invoke(cli, ["serve"])
    assert result.exit_code == 0 and calls[-1][:3] == ("127.0.0.1", 8750, False)
    assert "warning" not in result.output
    result = CliRunner().invoke(cli, ["serve", "--host", "0.0.0.0", "--port", "8800", "--open"])
    assert result.exit_code == 0 and calls[-1][:3] == ("0.0.0.0", 8800, True)
    assert "warning: serving on 0.0.0.0" in result.output


def test_serve_bad_options_exit_2(tmp_path):
    result = CliRunner().invoke(cli, ["serve", "--materials", str(tmp_path / "missing")])
    assert result.exit_code == 2
    with socket.socket() as busy:
        busy.bind(("127.0.0.1", 0))
        busy.listen()
        port = busy.getsockname()[1]
        result = CliRunner().invoke(cli, ["serve", "--port", str(port)])
    assert result.exit_code == 2
    assert result.output.strip().splitlines()[-1].startswith("error: --host/--port: cannot listen on")


def test_page_url():
    assert server.page_url("0.0.0.0", 8750) == "http://127.0.0.1:8750/"
    assert server.page_url("::1", 8750) == "http://[::1]:8750/"


def test_worker_processes_plan_the_same_as_the_server_process():
    from cutplan.web.service import Planner, WebErrors
    from tests.web.conftest import PORCH, example_mapping

    data = example_mapping(PORCH)
    here = Planner().plan(data)
    pool = Planner(workers=1)
    try:
        there = pool.plan(data)
        assert there[1] == here[1] and there[0].sets == here[0].sets
        data["set"][0]["notes"] = ["H5"]
        with pytest.raises(WebErrors) as caught:
            pool.plan(data)
        assert [e["key"] for e in caught.value.errors] == ["set[1].notes"]
    finally:
        pool.close()


def test_a_busy_port_named_by_the_builder_suggests_another():
    with socket.socket() as busy:
        busy.bind(("127.0.0.1", 0))
        busy.listen()
        port = busy.getsockname()[1]
        result = CliRunner().invoke(cli, ["serve", "--port", str(port)])
    assert result.exit_code == 2
    assert "--port 0 for any free port" in result.output


def test_a_busy_default_port_gives_way_to_a_free_one():
    # a second `cutplan serve` without --port: the first holds the port, the second takes another
    lines = []
    with socket.socket() as busy:
        busy.bind(("127.0.0.1", 0))
        busy.listen()
        port = busy.getsockname()[1]
        sock = server.listening_socket("127.0.0.1", port, any_port_if_busy=True, echo=lines.append)
        try:
            other = sock.getsockname()[1]
        finally:
            sock.close()
    assert other not in (port, 0)
    assert lines == [f"port {port} is busy (another cutplan serve?); using port {other} instead "
                     "(choose one with --port N)"]


def test_the_default_port_is_the_one_that_may_move(monkeypatch):
    calls = []
    monkeypatch.setattr(server, "serve", lambda *args, **kw: calls.append(kw["any_port_if_busy"]))
    CliRunner().invoke(cli, ["serve"])
    CliRunner().invoke(cli, ["serve", "--port", "8750"])
    assert calls == [True, False]
