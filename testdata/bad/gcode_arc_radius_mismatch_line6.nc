%
(invented bad program)
G21 G90 G17
G0 Z5
G0 X10 Y10
G2 X40 Y10 I5 J0 F300
