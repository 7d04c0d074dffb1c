# INVENTED SCENARIO (demo data, not a real product): the "Brava BX-5"
# 5 kg kitchen scale. A 24-bit sigma-delta converter returns signed
# counts; after the load-cell bridge and its gain stage the counts seen in
# service lie in [-200000, 7800000]. Factory calibration stored a tare
# count, a gain in grams per count and a small zero trim in grams; the
# firmware shows grams in Q13.4 (1/16 g steps) and must be within 0.05 g
# of the calibration line it implements.
#
# What it teaches: mixed formats meet exactly. An integer count (Q23.0)
# minus an integer tare gives Q24.0; times a gain with 31 fraction bits it
# is Q25.31 (57 bits, exact); adding a Q5.10 trim aligns the binary points
# at no cost; only the final rescale loses anything. The error sources
# show that the gain's quantization (a few milligrams at full load) is
# small beside the output rounding, so 31 fraction bits for the gain are
# enough and a 16-bit gain would not be (try Q0.15).
input counts : Q23.0 in [-200000, 7800000]
const tare = 83251 : Q23.0
const gain = 0.000642317 : Q0.31
const zero_trim = -1.37 : Q5.10
let net = counts - tare
let grams_exact = net * gain + zero_trim
let grams = rescale(grams_exact, Q13.4, nearest-even, saturate)
output grams budget 0.05
