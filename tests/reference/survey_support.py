"""Shared plumbing for the survey store checks (tests/reference/test_survey_*.py):
a PostgreSQL server to test against, a fresh database per test file, psql and
the cairn command. Imported, never run by ctest.

Under ctest the server is the fixture's (CAIRN_PG_STATE names its state file,
written by tests/survey/pg_cluster.sh). Run by hand, a test starts its own
throwaway cluster with the same script and stops it when it ends, also on
failure (try/finally, and the script's watchdog if the test is killed).
Source: PostgreSQL 15 documentation ("psql", "Connection URIs", "CREATE DATABASE").
"""
import contextlib
import os
import subprocess
import tempfile

HERE = os.path.dirname(os.path.abspath(__file__))
CLUSTER = os.path.join(HERE, "..", "survey", "pg_cluster.sh")


def read_state(path):
    state = {}
    with open(path) as f:
        for line in f:
            if "=" in line:
                k, v = line.rstrip("\n").split("=", 1)
                state[k] = v.strip("'")
    return state


@contextlib.contextmanager
def server():
    """Yields the cluster's state (PGSOCK, PGPORT, PGURL, ...)."""
    path = os.environ.get("CAIRN_PG_STATE")
    if path and os.path.exists(path):
        yield read_state(path)
        return
    with tempfile.TemporaryDirectory() as tmp:
        path = os.path.join(tmp, "state")
        env = dict(os.environ, OWNER_PID=str(os.getpid()))
        subprocess.run(["bash", CLUSTER, "start", path], check=True, env=env, stdout=subprocess.DEVNULL)
        try:
            yield read_state(path)
        finally:
            subprocess.run(["bash", CLUSTER, "stop", path], check=False)


class Store:
    """One database of the server, made fresh (with PostGIS) for a test."""

    def __init__(self, state, name):
        self.sock = state["PGSOCK"]
        self.port = state["PGPORT"]
        self.name = name
        self.psql("DROP DATABASE IF EXISTS %s" % name, db="postgres")
        self.psql("CREATE DATABASE %s" % name, db="postgres")
        self.psql("CREATE EXTENSION postgis")

    def url(self, user="postgres", db=None):
        return "postgresql://%s@/%s?host=%s&port=%s" % (user, db or self.name, self.sock, self.port)

    def psql(self, sql, user="postgres", db=None, check=True):
        """Runs SQL; returns (returncode, stdout, stderr). Rows as tab-separated lines."""
        r = subprocess.run(["psql", "-X", "-q", "-A", "-t", "-F", "\t", "-v", "ON_ERROR_STOP=1",
                            "-h", self.sock, "-p", self.port, "-U", user, "-d", db or self.name, "-c", sql],
                           capture_output=True, text=True)
        if check and r.returncode != 0:
            raise SystemExit("psql failed (%s): %s" % (sql[:80], r.stderr))
        return r.returncode, r.stdout, r.stderr

    def rows(self, sql, user="postgres"):
        _, out, _ = self.psql(sql, user=user)
        return [line.split("\t") for line in out.splitlines() if line]

    def value(self, sql, user="postgres"):
        rows = self.rows(sql, user=user)
        return rows[0][0] if rows else None


def cairn(binary, *args, env=None):
    r = subprocess.run([binary, *args], capture_output=True, text=True, env=env)
    return r.returncode, r.stdout, r.stderr
