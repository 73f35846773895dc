#!/usr/bin/env python3
"""Counts instructions between measure_begin(id) and measure_end in a QEMU trace.

The trace comes from `qemu-system-arm -singlestep -d exec,cpu,nochain -D FILE`:
with -singlestep every translation block is one instruction, and `nochain`
logs every execution. Each `Trace` line ends with the symbol of the block;
the register dump that follows holds the state before it runs (R00 = first
argument). For every measurement id this prints `id count`, one line per
occurrence, in order.
"""
import sys


def main(path):
    state = "idle"  # idle -> in_begin -> counting
    current_id = None
    count = 0
    want_r0 = False
    with open(path, encoding="utf-8", errors="replace") as trace:
        for line in trace:
            if line.startswith("Trace "):
                symbol = line.rsplit("]", 1)[-1].strip()
                if symbol == "measure_begin":
                    if state != "in_begin":
                        want_r0 = True
                    state = "in_begin"
                    continue
                if state == "in_begin":
                    state = "counting"
                    count = 0
                if state == "counting":
                    if symbol == "measure_end":
                        print(f"{current_id} {count}")
                        state = "idle"
                    else:
                        count += 1
            elif want_r0 and line.startswith("R00="):
                current_id = int(line.split()[0].split("=")[1], 16)
                want_r0 = False
    return 0


if __name__ == "__main__":
    sys.exit(main(sys.argv[1]))
