/**
 * The performance suite: each figure is a ratio of two times (or rates) measured in the same run on
 * the same data, printed as a table of figure, baseline, ratio, target and result. Not part of the
 * build's tests; run it with the command in docs/performance.md. Every data set here is generated
 * from a seed.
 */
package dev.riskmin.examples.bench;
