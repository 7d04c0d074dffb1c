# Invented example: the "Tern-2" thermistor read-out. A real bridge voltage
# v in [0.15, 3.2] V is sampled by a 12-bit converter with a 4 V reference
# (UQ2.10, rounding to nearest). The firmware maps it to degrees Celsius
# with a straight-line fit t = -35.7 v + 98.25 (invented coefficients) and
# stores the result in Q7.8 (1/256 degree steps).
input v : UQ2.10 in [0.15, 3.2] quantize nearest-even
const gain = -35.7 : Q6.9
const offset = 98.25 : Q7.8
let t = rescale(gain * v + offset, Q7.8, nearest-even, saturate)
output t budget 0.05
