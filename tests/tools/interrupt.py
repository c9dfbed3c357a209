#!/usr/bin/python3
# SPDX-License-Identifier: GPL-3.0-or-later
"""interrupt.py — runs a command, sends it one Ctrl-C (SIGINT) at a chosen point, exits with its status.

Usage: /usr/bin/python3 interrupt.py cpu|pipe COMMAND [ARGS...]
  cpu:  the signal comes once the command has used 1 s of CPU time (it is
        surely past reading its small inputs and into the long work);
  pipe: standard input is a pipe that never sends anything, and the signal
        comes once the command is blocked reading it (/proc/PID/wchan names
        the kernel's pipe read; Linux).
The command runs with SIGINT at its default (a shell would start a
background job with it ignored); its output goes to ../stdout and
../stderr.  Waiting for the point is not a timed assertion: what the tests
check holds whenever the signal comes.  Exit status: the command's (a
negative one for a signal, as Python reports it, modulo 256), or 200 if it
ended before the signal, 201 if it still ran two minutes after it (it
ignored the signal: killed, so the suite never hangs), 202 if in pipe mode it
never blocked on the pipe within 20 s.
"""
import os
import signal
import subprocess
import sys
import time

mode, command = sys.argv[1], sys.argv[2:]
stdin = None
if mode == "pipe":
    stdin, _writer = os.pipe()  # the writer stays open and silent
p = subprocess.Popen(command, stdin=stdin, stdout=open("../stdout", "w"),
                     stderr=open("../stderr", "w"),
                     preexec_fn=lambda: signal.signal(signal.SIGINT, signal.SIG_DFL))


def cpu_ticks():
    fields = open("/proc/%d/stat" % p.pid).read().rsplit(")", 1)[1].split()
    return int(fields[11]) + int(fields[12])


def blocked_on_pipe():
    try:
        return "pipe_read" in open("/proc/%d/wchan" % p.pid).read()
    except OSError:
        return False


deadline = None if mode == "cpu" else time.monotonic() + 20
while p.poll() is None:
    if cpu_ticks() >= os.sysconf("SC_CLK_TCK") if mode == "cpu" else blocked_on_pipe():
        break
    if deadline is not None and time.monotonic() > deadline:
        p.kill()
        p.wait()
        sys.exit(202)
    time.sleep(0.02)
if p.poll() is not None:
    sys.exit(200)
p.send_signal(signal.SIGINT)
try:
    status = p.wait(timeout=120)
except subprocess.TimeoutExpired:
    p.kill()
    p.wait()
    status = 201
sys.exit(status)
