%
(invented bad program)
G21 G90 G17
G0 Z5
G0 X10 Y10
G2 X50 Y10 R5 F300
