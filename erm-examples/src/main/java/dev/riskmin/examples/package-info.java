/**
 * Runnable demonstrations on invented scenarios with generated data. Nothing here is real data;
 * the numbers only show what the library does.
 */
package dev.riskmin.examples;
