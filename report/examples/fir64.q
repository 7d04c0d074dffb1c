# Invented example (not from any real product): the 64-tap low-pass FIR of the
# "Kestrel-7" vibration-sensor front end. 16-bit samples (Q0.15), 16-bit
# coefficients (Q0.15, rounded to nearest), products summed exactly into a
# 40-bit accumulator (Q9.30; the rescale keeps all 30 fraction bits, so it
# only checks the 40-bit range), one final rounding to a 16-bit output.
# The coefficients are a Hamming-windowed sinc with cut-off 0.11 of the
# sample rate, scaled to a DC gain of 0.6 (so that the sum of |h| stays below 1), written to 9 decimals.
input x0 : Q0.15 in [-1, 0.999969482421875]
input x1 : Q0.15 in [-1, 0.999969482421875]
input x2 : Q0.15 in [-1, 0.999969482421875]
input x3 : Q0.15 in [-1, 0.999969482421875]
input x4 : Q0.15 in [-1, 0.999969482421875]
input x5 : Q0.15 in [-1, 0.999969482421875]
input x6 : Q0.15 in [-1, 0.999969482421875]
input x7 : Q0.15 in [-1, 0.999969482421875]
input x8 : Q0.15 in [-1, 0.999969482421875]
input x9 : Q0.15 in [-1, 0.999969482421875]
input x10 : Q0.15 in [-1, 0.999969482421875]
input x11 : Q0.15 in [-1, 0.999969482421875]
input x12 : Q0.15 in [-1, 0.999969482421875]
input x13 : Q0.15 in [-1, 0.999969482421875]
input x14 : Q0.15 in [-1, 0.999969482421875]
input x15 : Q0.15 in [-1, 0.999969482421875]
input x16 : Q0.15 in [-1, 0.999969482421875]
input x17 : Q0.15 in [-1, 0.999969482421875]
input x18 : Q0.15 in [-1, 0.999969482421875]
input x19 : Q0.15 in [-1, 0.999969482421875]
input x20 : Q0.15 in [-1, 0.999969482421875]
input x21 : Q0.15 in [-1, 0.999969482421875]
input x22 : Q0.15 in [-1, 0.999969482421875]
input x23 : Q0.15 in [-1, 0.999969482421875]
input x24 : Q0.15 in [-1, 0.999969482421875]
input x25 : Q0.15 in [-1, 0.999969482421875]
input x26 : Q0.15 in [-1, 0.999969482421875]
input x27 : Q0.15 in [-1, 0.999969482421875]
input x28 : Q0.15 in [-1, 0.999969482421875]
input x29 : Q0.15 in [-1, 0.999969482421875]
input x30 : Q0.15 in [-1, 0.999969482421875]
input x31 : Q0.15 in [-1, 0.999969482421875]
input x32 : Q0.15 in [-1, 0.999969482421875]
input x33 : Q0.15 in [-1, 0.999969482421875]
input x34 : Q0.15 in [-1, 0.999969482421875]
input x35 : Q0.15 in [-1, 0.999969482421875]
input x36 : Q0.15 in [-1, 0.999969482421875]
input x37 : Q0.15 in [-1, 0.999969482421875]
input x38 : Q0.15 in [-1, 0.999969482421875]
input x39 : Q0.15 in [-1, 0.999969482421875]
input x40 : Q0.15 in [-1, 0.999969482421875]
input x41 : Q0.15 in [-1, 0.999969482421875]
input x42 : Q0.15 in [-1, 0.999969482421875]
input x43 : Q0.15 in [-1, 0.999969482421875]
input x44 : Q0.15 in [-1, 0.999969482421875]
input x45 : Q0.15 in [-1, 0.999969482421875]
input x46 : Q0.15 in [-1, 0.999969482421875]
input x47 : Q0.15 in [-1, 0.999969482421875]
input x48 : Q0.15 in [-1, 0.999969482421875]
input x49 : Q0.15 in [-1, 0.999969482421875]
input x50 : Q0.15 in [-1, 0.999969482421875]
input x51 : Q0.15 in [-1, 0.999969482421875]
input x52 : Q0.15 in [-1, 0.999969482421875]
input x53 : Q0.15 in [-1, 0.999969482421875]
input x54 : Q0.15 in [-1, 0.999969482421875]
input x55 : Q0.15 in [-1, 0.999969482421875]
input x56 : Q0.15 in [-1, 0.999969482421875]
input x57 : Q0.15 in [-1, 0.999969482421875]
input x58 : Q0.15 in [-1, 0.999969482421875]
input x59 : Q0.15 in [-1, 0.999969482421875]
input x60 : Q0.15 in [-1, 0.999969482421875]
input x61 : Q0.15 in [-1, 0.999969482421875]
input x62 : Q0.15 in [-1, 0.999969482421875]
input x63 : Q0.15 in [-1, 0.999969482421875]
const h0 = 0.000105590 : Q0.15 nearest-even
const h1 = 0.000406294 : Q0.15 nearest-even
const h2 = 0.000575500 : Q0.15 nearest-even
const h3 = 0.000503820 : Q0.15 nearest-even
const h4 = 0.000125896 : Q0.15 nearest-even
const h5 = -0.000497974 : Q0.15 nearest-even
const h6 = -0.001124677 : Q0.15 nearest-even
const h7 = -0.001373250 : Q0.15 nearest-even
const h8 = -0.000903353 : Q0.15 nearest-even
const h9 = 0.000335512 : Q0.15 nearest-even
const h10 = 0.001931211 : Q0.15 nearest-even
const h11 = 0.003067871 : Q0.15 nearest-even
const h12 = 0.002872482 : Q0.15 nearest-even
const h13 = 0.000933584 : Q0.15 nearest-even
const h14 = -0.002275017 : Q0.15 nearest-even
const h15 = -0.005360108 : Q0.15 nearest-even
const h16 = -0.006511722 : Q0.15 nearest-even
const h17 = -0.004412190 : Q0.15 nearest-even
const h18 = 0.000853445 : Q0.15 nearest-even
const h19 = 0.007401522 : Q0.15 nearest-even
const h20 = 0.012031381 : Q0.15 nearest-even
const h21 = 0.011559853 : Q0.15 nearest-even
const h22 = 0.004525449 : Q0.15 nearest-even
const h23 = -0.007519207 : Q0.15 nearest-even
const h24 = -0.019862012 : Q0.15 nearest-even
const h25 = -0.025945198 : Q0.15 nearest-even
const h26 = -0.019805704 : Q0.15 nearest-even
const h27 = 0.001269756 : Q0.15 nearest-even
const h28 = 0.035012502 : Q0.15 nearest-even
const h29 = 0.074226851 : Q0.15 nearest-even
const h30 = 0.108804723 : Q0.15 nearest-even
const h31 = 0.129047169 : Q0.15 nearest-even
const h32 = 0.129047169 : Q0.15 nearest-even
const h33 = 0.108804723 : Q0.15 nearest-even
const h34 = 0.074226851 : Q0.15 nearest-even
const h35 = 0.035012502 : Q0.15 nearest-even
const h36 = 0.001269756 : Q0.15 nearest-even
const h37 = -0.019805704 : Q0.15 nearest-even
const h38 = -0.025945198 : Q0.15 nearest-even
const h39 = -0.019862012 : Q0.15 nearest-even
const h40 = -0.007519207 : Q0.15 nearest-even
const h41 = 0.004525449 : Q0.15 nearest-even
const h42 = 0.011559853 : Q0.15 nearest-even
const h43 = 0.012031381 : Q0.15 nearest-even
const h44 = 0.007401522 : Q0.15 nearest-even
const h45 = 0.000853445 : Q0.15 nearest-even
const h46 = -0.004412190 : Q0.15 nearest-even
const h47 = -0.006511722 : Q0.15 nearest-even
const h48 = -0.005360108 : Q0.15 nearest-even
const h49 = -0.002275017 : Q0.15 nearest-even
const h50 = 0.000933584 : Q0.15 nearest-even
const h51 = 0.002872482 : Q0.15 nearest-even
const h52 = 0.003067871 : Q0.15 nearest-even
const h53 = 0.001931211 : Q0.15 nearest-even
const h54 = 0.000335512 : Q0.15 nearest-even
const h55 = -0.000903353 : Q0.15 nearest-even
const h56 = -0.001373250 : Q0.15 nearest-even
const h57 = -0.001124677 : Q0.15 nearest-even
const h58 = -0.000497974 : Q0.15 nearest-even
const h59 = 0.000125896 : Q0.15 nearest-even
const h60 = 0.000503820 : Q0.15 nearest-even
const h61 = 0.000575500 : Q0.15 nearest-even
const h62 = 0.000406294 : Q0.15 nearest-even
const h63 = 0.000105590 : Q0.15 nearest-even
let acc0 = h0 * x0
let acc1 = rescale(acc0 + h1 * x1, Q9.30, floor, wrap)
let acc2 = rescale(acc1 + h2 * x2, Q9.30, floor, wrap)
let acc3 = rescale(acc2 + h3 * x3, Q9.30, floor, wrap)
let acc4 = rescale(acc3 + h4 * x4, Q9.30, floor, wrap)
let acc5 = rescale(acc4 + h5 * x5, Q9.30, floor, wrap)
let acc6 = rescale(acc5 + h6 * x6, Q9.30, floor, wrap)
let acc7 = rescale(acc6 + h7 * x7, Q9.30, floor, wrap)
let acc8 = rescale(acc7 + h8 * x8, Q9.30, floor, wrap)
let acc9 = rescale(acc8 + h9 * x9, Q9.30, floor, wrap)
let acc10 = rescale(acc9 + h10 * x10, Q9.30, floor, wrap)
let acc11 = rescale(acc10 + h11 * x11, Q9.30, floor, wrap)
let acc12 = rescale(acc11 + h12 * x12, Q9.30, floor, wrap)
let acc13 = rescale(acc12 + h13 * x13, Q9.30, floor, wrap)
let acc14 = rescale(acc13 + h14 * x14, Q9.30, floor, wrap)
let acc15 = rescale(acc14 + h15 * x15, Q9.30, floor, wrap)
let acc16 = rescale(acc15 + h16 * x16, Q9.30, floor, wrap)
let acc17 = rescale(acc16 + h17 * x17, Q9.30, floor, wrap)
let acc18 = rescale(acc17 + h18 * x18, Q9.30, floor, wrap)
let acc19 = rescale(acc18 + h19 * x19, Q9.30, floor, wrap)
let acc20 = rescale(acc19 + h20 * x20, Q9.30, floor, wrap)
let acc21 = rescale(acc20 + h21 * x21, Q9.30, floor, wrap)
let acc22 = rescale(acc21 + h22 * x22, Q9.30, floor, wrap)
let acc23 = rescale(acc22 + h23 * x23, Q9.30, floor, wrap)
let acc24 = rescale(acc23 + h24 * x24, Q9.30, floor, wrap)
let acc25 = rescale(acc24 + h25 * x25, Q9.30, floor, wrap)
let acc26 = rescale(acc25 + h26 * x26, Q9.30, floor, wrap)
let acc27 = rescale(acc26 + h27 * x27, Q9.30, floor, wrap)
let acc28 = rescale(acc27 + h28 * x28, Q9.30, floor, wrap)
let acc29 = rescale(acc28 + h29 * x29, Q9.30, floor, wrap)
let acc30 = rescale(acc29 + h30 * x30, Q9.30, floor, wrap)
let acc31 = rescale(acc30 + h31 * x31, Q9.30, floor, wrap)
let acc32 = rescale(acc31 + h32 * x32, Q9.30, floor, wrap)
let acc33 = rescale(acc32 + h33 * x33, Q9.30, floor, wrap)
let acc34 = rescale(acc33 + h34 * x34, Q9.30, floor, wrap)
let acc35 = rescale(acc34 + h35 * x35, Q9.30, floor, wrap)
let acc36 = rescale(acc35 + h36 * x36, Q9.30, floor, wrap)
let acc37 = rescale(acc36 + h37 * x37, Q9.30, floor, wrap)
let acc38 = rescale(acc37 + h38 * x38, Q9.30, floor, wrap)
let acc39 = rescale(acc38 + h39 * x39, Q9.30, floor, wrap)
let acc40 = rescale(acc39 + h40 * x40, Q9.30, floor, wrap)
let acc41 = rescale(acc40 + h41 * x41, Q9.30, floor, wrap)
let acc42 = rescale(acc41 + h42 * x42, Q9.30, floor, wrap)
let acc43 = rescale(acc42 + h43 * x43, Q9.30, floor, wrap)
let acc44 = rescale(acc43 + h44 * x44, Q9.30, floor, wrap)
let acc45 = rescale(acc44 + h45 * x45, Q9.30, floor, wrap)
let acc46 = rescale(acc45 + h46 * x46, Q9.30, floor, wrap)
let acc47 = rescale(acc46 + h47 * x47, Q9.30, floor, wrap)
let acc48 = rescale(acc47 + h48 * x48, Q9.30, floor, wrap)
let acc49 = rescale(acc48 + h49 * x49, Q9.30, floor, wrap)
let acc50 = rescale(acc49 + h50 * x50, Q9.30, floor, wrap)
let acc51 = rescale(acc50 + h51 * x51, Q9.30, floor, wrap)
let acc52 = rescale(acc51 + h52 * x52, Q9.30, floor, wrap)
let acc53 = rescale(acc52 + h53 * x53, Q9.30, floor, wrap)
let acc54 = rescale(acc53 + h54 * x54, Q9.30, floor, wrap)
let acc55 = rescale(acc54 + h55 * x55, Q9.30, floor, wrap)
let acc56 = rescale(acc55 + h56 * x56, Q9.30, floor, wrap)
let acc57 = rescale(acc56 + h57 * x57, Q9.30, floor, wrap)
let acc58 = rescale(acc57 + h58 * x58, Q9.30, floor, wrap)
let acc59 = rescale(acc58 + h59 * x59, Q9.30, floor, wrap)
let acc60 = rescale(acc59 + h60 * x60, Q9.30, floor, wrap)
let acc61 = rescale(acc60 + h61 * x61, Q9.30, floor, wrap)
let acc62 = rescale(acc61 + h62 * x62, Q9.30, floor, wrap)
let acc63 = rescale(acc62 + h63 * x63, Q9.30, floor, wrap)
let y = rescale(acc63, Q0.15, nearest-even, saturate)
output y budget 20 ulp
