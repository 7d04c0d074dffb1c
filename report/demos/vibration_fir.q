# INVENTED SCENARIO (demo data, not a real product): the "Kestrel VM-3"
# bearing-vibration monitor. A MEMS accelerometer delivers 16-bit samples
# (Q0.15, full scale +-16 g); the analog front end clips at 90 % of full
# scale, so samples lie in [-0.9, 0.9]. Before decimation by 4 the
# firmware runs an 8-tap low-pass FIR (invented symmetric coefficients,
# DC gain 1) with a 32-bit multiply-accumulate unit.
#
# What it teaches: guard bits. The eight exact Q1.30 products sum to
# Q4.30 (35 bits). The MAC keeps 2 guard bits above the sign (Q2.29,
# 32 bits) and truncates one fraction bit; the sum of |coefficient| is
# 1.044, so with inputs within +-0.9 the accumulator never passes +-0.94:
# wrap-around at the accumulator is safe, and the audit proves it
# (headroom column). The coefficients' own quantization into Q0.15 is the
# largest error source, larger than the final rounding.
input x0 : Q0.15 in [-0.9, 0.9]
input x1 : Q0.15 in [-0.9, 0.9]
input x2 : Q0.15 in [-0.9, 0.9]
input x3 : Q0.15 in [-0.9, 0.9]
input x4 : Q0.15 in [-0.9, 0.9]
input x5 : Q0.15 in [-0.9, 0.9]
input x6 : Q0.15 in [-0.9, 0.9]
input x7 : Q0.15 in [-0.9, 0.9]
const c0 = -0.0110 : Q0.15
const c1 = 0.0280 : Q0.15
const c2 = 0.1440 : Q0.15
const c3 = 0.3390 : Q0.15
const c4 = 0.3390 : Q0.15
const c5 = 0.1440 : Q0.15
const c6 = 0.0280 : Q0.15
const c7 = -0.0110 : Q0.15
let acc = rescale(c0*x0 + c1*x1 + c2*x2 + c3*x3 + c4*x4 + c5*x5 + c6*x6 + c7*x7, Q2.29, floor, wrap)
let y = rescale(acc, Q0.15, nearest-even, saturate)
output y budget 4 ulp
