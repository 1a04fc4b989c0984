"""Reference answers from cftime for calendar's Go tests (cftime_test.go).

Reads one JSON object on stdin:
  {"decode": [[value, units, calendar], ...],
   "encode": [[units, calendar, year, month, day, hour, minute, second, microsecond], ...],
   "parse":  [[units, calendar], ...]}
and writes one JSON object with the same keys: for decode a list of
[year, month, day, hour, minute, second, microsecond] or an error string, for
encode the number cftime.date2num returns or an error string, for parse
"ok" or an error string.
"""
import json
import sys
import warnings

import cftime

warnings.simplefilter("ignore")  # cftime warns about conventions CF leaves open


def decode(value, units, calendar):
    try:
        d = cftime.num2date(value, units, calendar=calendar, only_use_cftime_datetimes=True)
    except Exception as e:  # the Go side compares error against success only
        return "error: %s" % e
    return [d.year, d.month, d.day, d.hour, d.minute, d.second, d.microsecond]


def encode(units, calendar, y, mo, d, h, mi, s, us):
    try:
        date = cftime.datetime(y, mo, d, h, mi, s, us, calendar=calendar)
        return float(cftime.date2num(date, units, calendar=calendar))
    except Exception as e:
        return "error: %s" % e


def parse(units, calendar):
    try:
        cftime.num2date(0, units, calendar=calendar, only_use_cftime_datetimes=True)
    except Exception as e:
        return "error: %s" % e
    return "ok"


def main():
    req = json.load(sys.stdin)
    out = {
        "version": cftime.__version__,
        "decode": [decode(*c) for c in req.get("decode") or []],
        "encode": [encode(*c) for c in req.get("encode") or []],
        "parse": [parse(*c) for c in req.get("parse") or []],
    }
    json.dump(out, sys.stdout)


if __name__ == "__main__":
    main()
