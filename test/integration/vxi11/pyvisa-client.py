"""An independent VISA client (Debian's python3-pyvisa-py) talking to one
resource: prints one JSON object with what it read, for the VXI-11 tests.

usage: pyvisa-client.py RESOURCE [TRACE_QUERY]
"""
import json
import sys

import pyvisa

resource_name = sys.argv[1]
trace_query = sys.argv[2] if len(sys.argv) > 2 else None
manager = pyvisa.ResourceManager("@py")
instrument = manager.open_resource(resource_name)
instrument.timeout = 10000
if resource_name.upper().endswith("::SOCKET"):
    # A raw socket has no END: LF ends each message both ways.
    instrument.read_termination = "\n"
    instrument.write_termination = "\n"
out = {"idn": instrument.query("*IDN?").strip()}
instrument.write("*CLS")
instrument.write("NOSUCH:HEADer 1")
out["error"] = instrument.query("SYSTem:ERRor?").strip()
if trace_query:
    # pyvisa parses the IEEE 488.2 definite-length block header itself.
    values = instrument.query_binary_values(trace_query, datatype="h", is_big_endian=True, container=list)
    out["trace"] = values
instrument.close()
manager.close()
print(json.dumps(out))
