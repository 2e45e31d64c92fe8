"""Outside references for the transaction ingest contract tests.

Run with Debian's /usr/bin/python3: `ingest-contract-reference.py MODE`, a JSON
list on stdin, a JSON list (same order) on stdout.

  currency-precision  codes -> CLDR minor-unit digits from babel
                      (babel.numbers.get_currency_precision), or null for a
                      code babel does not list
  ip                  [text, ours-or-null] -> {"ok", "compressed", "same"}:
                      Python's ipaddress verdict, its compressed form, and
                      whether our canonical text is the same address
  datetime            texts -> milliseconds since 1970-01-01T00:00:00Z from
                      datetime.fromisoformat, or null when it refuses the text
  hmac-sha256         [key hex, data hex] -> hex HMAC-SHA-256 (hmac, hashlib)

Exit status 3 with a message on stderr when a Debian package is missing.
"""
import datetime
import hashlib
import hmac
import ipaddress
import json
import sys


def currency_precision(codes):
    try:
        from babel.numbers import get_currency_precision, list_currencies
    except ImportError:
        sys.stderr.write("babel is missing: apt-get install -y python3-babel\n")
        sys.exit(3)
    known = list_currencies()
    # get_currency_precision answers 2 for any code it does not know, so unknown codes are reported as null.
    return [get_currency_precision(c) if c in known else None for c in codes]


def ip(pairs):
    out = []
    for text, ours in pairs:
        try:
            addr = ipaddress.ip_address(text)
        except ValueError:
            out.append({"ok": False, "compressed": None, "same": None})
            continue
        same = None
        if ours is not None:
            try:
                same = ipaddress.ip_address(ours) == addr
            except ValueError:
                same = False
        out.append({"ok": True, "compressed": addr.compressed, "same": same})
    return out


EPOCH = datetime.datetime(1970, 1, 1)


def date_time(texts):
    out = []
    for text in texts:
        try:
            value = datetime.datetime.fromisoformat(text)
        except ValueError:
            out.append(None)
            continue
        if value.utcoffset() is None:
            out.append(None)
            continue
        # Naive arithmetic, so years near 1 and 9999 do not overflow a UTC conversion.
        delta = value.replace(tzinfo=None) - EPOCH - value.utcoffset()
        out.append(delta // datetime.timedelta(milliseconds=1))
    return out


def hmac_sha256(pairs):
    return [hmac.new(bytes.fromhex(k), bytes.fromhex(d), hashlib.sha256).hexdigest() for k, d in pairs]


MODES = {"currency-precision": currency_precision, "ip": ip, "datetime": date_time, "hmac-sha256": hmac_sha256}

if __name__ == "__main__":
    if len(sys.argv) != 2 or sys.argv[1] not in MODES:
        sys.stderr.write("usage: ingest-contract-reference.py %s < input.json\n" % "|".join(MODES))
        sys.exit(2)
    json.dump(MODES[sys.argv[1]](json.load(sys.stdin)), sys.stdout)
