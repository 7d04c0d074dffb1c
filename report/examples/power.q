# Invented example: the "Heron" power monitor. Current i in [-12, 12] A and
# voltage u in [180, 260] V are real signals read by converters into Q4.11
# and UQ9.7 (floor: the converters truncate). Power p = i·u is kept in
# Q12.3 (1/8 W) after truncation, and the energy increment over a 1/64 s
# tick, e = p / 64, in Q6.9 (round to nearest, ties to even).
input i : Q4.11 in [-12, 12] quantize floor
input u : UQ9.7 in [180, 260] quantize floor
let p = rescale(i * u, Q12.3, floor, saturate)
let e = rescale(p >> 6, Q6.9, nearest-even, saturate)
output p
output e
