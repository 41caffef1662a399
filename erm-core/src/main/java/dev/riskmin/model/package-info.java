/**
 * Fitted linear models: decision values, predictions and probabilities where the loss defines one.
 * Models are immutable and safe to share across threads; prediction allocates nothing unless a
 * method returns a new array.
 *
 * <p>{@link dev.riskmin.model.ModelFile} saves and loads models in the library's own versioned
 * text format ({@code docs/model-format.md}); {@link dev.riskmin.model.SavedModel} is what a file
 * holds. Their methods refuse a null argument with a NullPointerException naming it, except where
 * null is documented to mean "none".
 */
package dev.riskmin.model;
