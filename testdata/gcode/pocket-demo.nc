%
(chipband timing sample: an invented 40 x 30 mm pocket, 2 levels)
(Machining can injure. Verify every program in a simulator and with an air cut.)
G21 G90 G17 G91.1
G0 Z5
T1 M6
S12000 M3
(op: pocket level 1)
G0 X10 Y10
G1 Z-1 F300
G1 X50 F1200
G1 Y40
G1 X10
G1 Y10
G2 X20 Y20 I10 J0 F900 ; quarter arc
G3 X30 Y10 R10
G0 Z5
(op: pocket level 2)
G0 X10 Y10
G1 Z-2 F300
G1 X50 F1200
Y40
X10
Y10
G4 P0.5
G0 Z5
M5
M30
%
