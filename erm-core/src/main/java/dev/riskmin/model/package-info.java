/**
 * Fitted linear models: decision values, predictions and probabilities where the loss defines one.
 * Models are immutable and safe to share across threads; prediction allocates nothing unless a
 * method returns a new array.
 */
package dev.riskmin.model;
