# INVENTED SCENARIO (demo data, not a real product): the "Wren TD-2"
# call-progress tone detector. A Goertzel stage delivers the real and
# imaginary parts of one DFT bin as Q0.15 words; the detector compares the
# bin's power |X|^2 = re^2 + im^2 with a threshold.
#
# What it teaches: a sum of squares needs one more integer bit than a
# square (the two Q1.30 products add to Q2.30), and an unsigned result
# format is only safe if the analysis can show the value is never
# negative. Look at how much headroom the exact sum really has, and at
# the rounding that truncating (floor) adds: it biases the power low by
# half an ulp on average, which the noise model's mean shows.
input re : Q0.15 in [-1, 0.999969482421875]
input im : Q0.15 in [-1, 0.999969482421875]
let power = re * re + im * im
let p16 = rescale(power, UQ1.15, floor, saturate)
output p16 budget 1 ulp
const threshold = 0.0625 : UQ1.15
output margin = p16 - threshold
