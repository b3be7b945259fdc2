"""drift: how each note of a wind instrument moves in pitch with the air inside its bore.

The layers, in the order data flows through them:
climate -> thermal state -> air properties per segment -> impedance -> note frequencies -> drift rows.

Importing the package is cheap: CoolProp is loaded only when air properties are first computed.
"""

__version__ = "0.1.0"
