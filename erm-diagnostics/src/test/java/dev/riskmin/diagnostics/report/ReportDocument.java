package dev.riskmin.diagnostics.report;

import org.w3c.dom.Document;
import org.w3c.dom.Element;
import org.w3c.dom.NodeList;
import org.xml.sax.InputSource;

import javax.xml.XMLConstants;
import javax.xml.parsers.DocumentBuilder;
import javax.xml.parsers.DocumentBuilderFactory;
import java.io.StringReader;
import java.util.ArrayList;
import java.util.List;

/**
 * A rendered report read back with the JDK's XML parser (the report is well-formed XML by design),
 * with lookups by the report's own data attributes.
 */
final class ReportDocument {
    final Document document;

    private ReportDocument(Document document) {
        this.document = document;
    }

    /** Parses the report; throws if it is not well-formed XML. No external entity or DTD is loaded. */
    static ReportDocument parse(String html) {
        try {
            DocumentBuilderFactory f = DocumentBuilderFactory.newInstance();
            f.setNamespaceAware(false);
            f.setValidating(false);
            f.setExpandEntityReferences(false);
            f.setFeature(XMLConstants.FEATURE_SECURE_PROCESSING, true);
            f.setFeature("http://apache.org/xml/features/nonvalidating/load-external-dtd", false);
            DocumentBuilder b = f.newDocumentBuilder();
            b.setErrorHandler(null);
            return new ReportDocument(b.parse(new InputSource(new StringReader(html))));
        } catch (Exception e) {
            throw new AssertionError("the report is not well-formed XML: " + e.getMessage(), e);
        }
    }

    List<Element> all(String tag) {
        return elements(document.getElementsByTagName(tag));
    }

    static List<Element> all(Element root, String tag) {
        return elements(root.getElementsByTagName(tag));
    }

    private static List<Element> elements(NodeList nodes) {
        List<Element> list = new ArrayList<>();
        for (int i = 0; i < nodes.getLength(); i++) {
            list.add((Element) nodes.item(i));
        }
        return list;
    }

    /** The element with the tag whose attribute has the value, or null. */
    Element find(String tag, String attribute, String value) {
        for (Element e : all(tag)) {
            if (value.equals(e.getAttribute(attribute))) {
                return e;
            }
        }
        return null;
    }

    /** The figure of a plot. */
    Element plot(String id) {
        Element e = find("figure", "data-plot", id);
        if (e == null) {
            throw new AssertionError("no plot " + id);
        }
        return e;
    }

    /** The section with the id. */
    Element section(String id) {
        Element e = find("section", "id", id);
        if (e == null) {
            throw new AssertionError("no section " + id);
        }
        return e;
    }

    /** The rows of a plot's value table for one series: each row's cells after the series name, parsed. */
    List<double[]> rows(String plotId, String series) {
        List<double[]> rows = new ArrayList<>();
        for (Element tr : all(plot(plotId), "tr")) {
            if (series.equals(tr.getAttribute("data-series"))) {
                List<Element> cells = all(tr, "td");
                double[] row = new double[cells.size() - 1];
                for (int i = 1; i < cells.size(); i++) {
                    row[i - 1] = Double.parseDouble(cells.get(i).getTextContent());
                }
                rows.add(row);
            }
        }
        return rows;
    }

    /** The series group of a plot's SVG, or null. */
    Element seriesGroup(String plotId, String series) {
        for (Element g : all(plot(plotId), "g")) {
            if (series.equals(g.getAttribute("data-series"))) {
                return g;
            }
        }
        return null;
    }

    /** The number of vertices of the series' polyline. */
    int polylinePoints(String plotId, String series) {
        Element g = seriesGroup(plotId, series);
        List<Element> lines = all(g, "polyline");
        if (lines.isEmpty()) {
            return 0;
        }
        String points = lines.get(0).getAttribute("points").trim();
        return points.isEmpty() ? 0 : points.split(" ").length;
    }

    /** The texts of the elements with a given tag under a root. */
    static List<String> texts(Element root, String tag) {
        List<String> texts = new ArrayList<>();
        for (Element e : all(root, tag)) {
            texts.add(e.getTextContent());
        }
        return texts;
    }
}
