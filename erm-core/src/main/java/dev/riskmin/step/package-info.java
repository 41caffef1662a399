/**
 * Step-size schedules ε<sub>t</sub> and the calibration of an initial step size. Schedules are
 * immutable, thread-safe and allocation-free. Null is never a valid argument.
 */
package dev.riskmin.step;
