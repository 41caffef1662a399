/**
 * Small shared helpers: argument checks with messages that name the option and the value.
 * Null is never a valid argument unless a method says so. All types here are stateless.
 */
package dev.riskmin.util;
