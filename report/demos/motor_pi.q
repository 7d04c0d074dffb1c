# INVENTED SCENARIO (demo data, not a real product): one step of the
# current loop of the "Osprey M4" brushless drive, run at 20 kHz. The
# phase current is measured by a 12-bit converter (Q3.12 amperes, +-8 A);
# the controller keeps its integrator in Q0.31 and drives the PWM duty in
# Q0.15. The state (the integrator before this step) is an input; the
# integrator after the step is an output, so one step is audited at a
# time.
#
# What it teaches: saturation as design. The integrator saturates at
# +-1 (anti-windup: it cannot wind up past what the actuator can do) and
# the duty saturates symmetrically so the PWM never sees -1.0. The audit
# shows both can saturate and by how much; `qbound check` fails until the
# designer says so with --allow-saturation integ_next,duty. The error
# bounds at saturating nodes include the clamping itself (distance from
# the unclamped ideal value), which is why these outputs carry no budget.
input i_ref  : Q3.12 in [-6, 6]
input i_meas : Q3.12 in [-8, 7.999755859375]
input integ  : Q0.31 in [-1, 0.9999999995343387]
const kp = 0.35 : Q0.15
const ki = 0.0125 : Q0.15
let err = i_ref - i_meas
let integ_next = rescale(integ + ki * err, Q0.31, nearest-even, saturate)
let duty = rescale(kp * err + integ_next, Q0.15, nearest-even, saturate-symmetric)
output duty
output integ_next
