package dev.riskmin.model;

import dev.riskmin.loss.Response;
import org.junit.jupiter.api.Test;
import org.junit.jupiter.params.ParameterizedTest;
import org.junit.jupiter.params.provider.EnumSource;

import java.io.Serializable;
import java.time.Instant;
import java.util.Arrays;
import java.util.List;
import java.util.Optional;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertNotEquals;
import static org.junit.jupiter.api.Assertions.assertSame;
import static org.junit.jupiter.api.Assertions.assertThrows;
import static org.junit.jupiter.api.Assertions.assertTrue;

class SavedModelTest {

    private static final LinearModel LOGISTIC = LinearModel.of(new double[]{1, -2}, 0.5, Response.LOGISTIC, "logistic");
    private static final MulticlassModel SOFTMAX = MulticlassModel.of(new double[]{1, 2, 3, 4, 5, 6},
            new double[]{0, 1, 2}, 2, Response.SOFTMAX, "softmax-cross-entropy");

    private static void assertMessage(Throwable e, String... fragments) {
        for (String f : fragments) {
            assertTrue(e.getMessage().contains(f), () -> "message \"" + e.getMessage() + "\" should contain \"" + f + "\"");
        }
    }

    @ParameterizedTest(name = "{0}")
    @EnumSource(Response.class)
    void classCountFollowsTheResponse(Response response) {
        int expected;
        SavedModel m;
        if (response == Response.SOFTMAX || response == Response.ARGMAX) {
            m = SavedModel.of(MulticlassModel.of(new double[8], new double[4], 2, response, "x"));
            expected = 4;
        } else {
            m = SavedModel.of(LinearModel.of(new double[2], 0, response, "x"));
            expected = response == Response.LOGISTIC || response == Response.MARGIN ? 2 : 0;
        }
        assertEquals(expected, m.classCount());
        assertEquals(response, m.response());
    }

    @Test
    void kindSelectsTheModelAndTheOtherAccessorRefusesNamingTheRightOne() {
        SavedModel a = SavedModel.of(LOGISTIC);
        SavedModel b = SavedModel.of(SOFTMAX);
        assertEquals(SavedModel.Kind.LINEAR, a.kind());
        assertEquals(SavedModel.Kind.MULTICLASS, b.kind());
        assertSame(LOGISTIC, a.linear());
        assertSame(SOFTMAX, b.multiclass());
        assertMessage(assertThrows(IllegalStateException.class, a::multiclass), "use linear()");
        assertMessage(assertThrows(IllegalStateException.class, b::linear), "3 classes", "use multiclass()");
    }

    @Test
    void classNamesMustCoverEveryLabelOnceAndOnlyOnClassifiers() {
        SavedModel a = SavedModel.of(LOGISTIC);
        assertEquals(List.of("no", "yes"), a.withClassNames(List.of("no", "yes")).classNames());
        assertMessage(assertThrows(IllegalArgumentException.class, () -> a.withClassNames(List.of("only"))),
                "names has 1 entries", "2 classes");
        assertMessage(assertThrows(IllegalArgumentException.class,
                () -> SavedModel.of(SOFTMAX).withClassNames(List.of("a", "b", "a"))), "names[2] (\"a\") repeats names[0]");
        assertMessage(assertThrows(NullPointerException.class, () -> a.withClassNames(Arrays.asList("x", null))),
                "names[1]");
        SavedModel regression = SavedModel.of(LinearModel.of(new double[1], 0, Response.EXPONENTIAL, "poisson"));
        assertMessage(assertThrows(IllegalArgumentException.class, () -> regression.withClassNames(List.of("a", "b"))),
                "regression model", "EXPONENTIAL");
    }

    @Test
    void namesAreCopied() {
        String[] names = {"no", "yes"};
        SavedModel m = SavedModel.of(LOGISTIC).withClassNames(Arrays.asList(names));
        names[0] = "changed";
        assertEquals(List.of("no", "yes"), m.classNames());
        assertThrows(UnsupportedOperationException.class, () -> m.classNames().set(0, "x"));
    }

    @Test
    void metadataIsOptionalAndWithMethodsReturnNewInstances() {
        SavedModel plain = SavedModel.of(LOGISTIC);
        assertEquals(Optional.empty(), plain.standardized());
        assertEquals(Optional.empty(), plain.created());
        assertEquals(Optional.empty(), plain.note());
        assertEquals(List.of(), plain.classNames());
        Instant t = Instant.parse("2024-05-01T12:00:00Z");
        SavedModel full = plain.withStandardized(false).withCreated(t).withNote("n");
        assertEquals(Optional.of(false), full.standardized());
        assertEquals(Optional.of(t), full.created());
        assertEquals(Optional.of("n"), full.note());
        assertEquals(Optional.empty(), plain.note(), "the original is unchanged");
        assertEquals(Optional.empty(), full.withNote(null).withCreated(null).note());
    }

    @Test
    void nullLossNameCannotBeSavedAndNullModelIsRefusedByName() {
        LinearModel unnamed = LinearModel.of(new double[1], 0, Response.IDENTITY, null);
        assertMessage(assertThrows(IllegalArgumentException.class, () -> SavedModel.of(unnamed)), "lossName is null");
        assertMessage(assertThrows(NullPointerException.class, () -> SavedModel.of((LinearModel) null)), "model");
    }

    /** Equality is bit for bit: 0.0 and −0.0 are different parameters, and metadata counts. */
    @Test
    void equalityComparesParametersBitForBitAndMetadata() {
        SavedModel plus = SavedModel.of(LinearModel.of(new double[]{0.0}, 1, Response.IDENTITY, "squared"));
        SavedModel minus = SavedModel.of(LinearModel.of(new double[]{-0.0}, 1, Response.IDENTITY, "squared"));
        SavedModel again = SavedModel.of(LinearModel.of(new double[]{0.0}, 1, Response.IDENTITY, "squared"));
        assertEquals(plus, again);
        assertEquals(plus.hashCode(), again.hashCode());
        assertNotEquals(plus, minus);
        assertNotEquals(plus, plus.withNote(""));
        assertNotEquals(plus, SavedModel.of(LinearModel.of(new double[]{0.0}, 1, Response.IDENTITY, "absolute")));
        assertNotEquals(SavedModel.of(SOFTMAX), SavedModel.of(MulticlassModel.of(new double[]{1, 2, 3, 4, 5, 6},
                new double[]{0, 1, Math.nextUp(2.0)}, 2, Response.SOFTMAX, "softmax-cross-entropy")));
    }

    /** Neither type can travel through Java serialization, so no model ever arrives that way. */
    @Test
    void neitherTypeIsSerializable() {
        assertFalse(Serializable.class.isAssignableFrom(SavedModel.class));
        assertFalse(Serializable.class.isAssignableFrom(ModelFile.class));
    }

    @Test
    void toStringQuotesTheLossName() {
        SavedModel m = SavedModel.of(LinearModel.of(new double[1], 0, Response.IDENTITY, "a\nb"));
        assertEquals("SavedModel[LINEAR, loss=\"a\\u000ab\", response=IDENTITY, d=1]", m.toString());
    }
}
