package dev.riskmin.examples;

import org.w3c.dom.Document;
import org.xml.sax.InputSource;

import javax.xml.XMLConstants;
import javax.xml.parsers.DocumentBuilder;
import javax.xml.parsers.DocumentBuilderFactory;
import java.io.IOException;
import java.io.StringReader;
import java.nio.charset.StandardCharsets;
import java.nio.file.Files;
import java.nio.file.Path;
import java.util.List;

import static org.junit.jupiter.api.Assertions.assertFalse;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.junit.jupiter.api.Assertions.fail;

/** Checks shared by the tests that write HTML reports. */
public final class ReportChecks {
    private ReportChecks() {
    }

    /**
     * Asserts that the file is a report that needs nothing outside itself: well-formed (the report is
     * polyglot markup, docs/report.md), with plots drawn inline, and no reference to a script, style
     * sheet, image, font or address outside the file.
     *
     * @return the report's text
     */
    public static String assertSelfContained(Path report) throws IOException {
        assertTrue(Files.isRegularFile(report), report + " exists");
        String html = Files.readString(report, StandardCharsets.UTF_8);
        assertTrue(html.startsWith("<!DOCTYPE html>"), "an HTML document");
        assertTrue(html.contains("<svg"), "plots drawn inline as SVG");
        for (String outside : List.of("http:", "https:", "<link", "src=", "href=", "url(", "@import", "<script",
                "<img", "<iframe", "<object", "@font-face")) {
            assertFalse(html.contains(outside), report.getFileName() + " refers outside itself: " + outside);
        }
        parse(html);
        return html;
    }

    private static Document parse(String html) {
        try {
            DocumentBuilderFactory f = DocumentBuilderFactory.newInstance();
            f.setFeature(XMLConstants.FEATURE_SECURE_PROCESSING, true);
            f.setFeature("http://apache.org/xml/features/nonvalidating/load-external-dtd", false);
            f.setExpandEntityReferences(false);
            DocumentBuilder b = f.newDocumentBuilder();
            b.setErrorHandler(null);
            return b.parse(new InputSource(new StringReader(html)));
        } catch (Exception e) {
            return fail("the report is not well-formed: " + e.getMessage());
        }
    }
}
