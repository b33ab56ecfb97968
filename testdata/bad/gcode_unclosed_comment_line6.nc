%
(invented bad program)
G21 G90 G17
G0 Z5
G0 X10 Y10
G1 X20 F300 (no closing paren
