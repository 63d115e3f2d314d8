package org.forkscape.web.figure;

import static org.junit.jupiter.api.Assertions.assertEquals;
import static org.junit.jupiter.api.Assertions.assertTrue;
import static org.springframework.test.web.servlet.request.MockMvcRequestBuilders.get;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.jsonPath;
import static org.springframework.test.web.servlet.result.MockMvcResultMatchers.status;

import java.io.ByteArrayInputStream;
import java.util.ArrayList;
import java.util.List;
import javax.imageio.ImageIO;
import javax.xml.parsers.DocumentBuilderFactory;
import org.apache.pdfbox.Loader;
import org.apache.pdfbox.pdmodel.PDDocument;
import org.forkscape.web.CivicTestData;
import org.forkscape.web.WebTest;
import org.junit.jupiter.api.BeforeEach;
import org.junit.jupiter.api.Test;
import org.springframework.mock.web.MockHttpServletResponse;
import org.w3c.dom.Document;
import org.w3c.dom.Element;
import org.w3c.dom.NodeList;
import tools.jackson.databind.JsonNode;

/**
 * The explorer's figure for print: for the filter, order, scale and group of a curve request, the SVG has
 * one mark per specification of the set the curve endpoint returns (each by its number), and the PDF and PNG
 * are the same drawing at the chosen width.
 */
class FigureExportTest extends WebTest {
    private static final double MM = 72 / 25.4;
    private String analysis;
    private String run;
    private String base;

    @BeforeEach
    void run() throws Exception {
        analysis = upload("figure.csv", CivicTestData.csv(160, 12));
        run = runToEnd(analysis, CivicTestData.plan(1));
        base = "/api/analyses/" + analysis + "/runs/" + run;
    }

    @Test
    void theSvgHasTheMarksOfTheCurveEndpointsSet() throws Exception {
        String[] view = {"drop", "2.1,3.0", "sort", "factor:4", "scale", "fitted", "group", "1"};
        JsonNode curve = json(mvc.perform(get(base + "/curve").param(view[0], view[1]).param(view[2], view[3])
                .param(view[4], view[5]).param(view[6], view[7])).andReturn().getResponse().getContentAsString());
        assertEquals("points", curve.path("curve").path("mode").asString());
        List<String> expected = new ArrayList<>();
        for (JsonNode s : curve.path("curve").path("points").path("spec")) {
            expected.add("spec-" + s.asLong());
        }
        assertTrue(expected.size() > 10 && expected.size() < curve.path("total").asInt(), expected.size() + " marks");
        MockHttpServletResponse r = mvc.perform(get(base + "/figure").param("format", "svg").param(view[0], view[1])
                .param(view[2], view[3]).param(view[4], view[5]).param(view[6], view[7]).param("colour", "4"))
                .andExpect(status().isOk()).andReturn().getResponse();
        assertEquals("image/svg+xml", r.getContentType());
        assertTrue(r.getHeader("Content-Disposition").contains("specification-curve-" + analysis + "-run-" + run
                + "-fitted.svg"), r.getHeader("Content-Disposition"));
        Document svg = DocumentBuilderFactory.newDefaultNSInstance().newDocumentBuilder()
                .parse(new ByteArrayInputStream(r.getContentAsByteArray()));
        NodeList groups = svg.getElementsByTagNameNS("http://www.w3.org/2000/svg", "g");
        List<String> marks = new ArrayList<>();
        StringBuilder text = new StringBuilder();
        for (int i = 0; i < groups.getLength(); i++) {
            String id = ((Element) groups.item(i)).getAttribute("id");
            if (id.startsWith("spec-")) {
                marks.add(id);
            }
        }
        NodeList texts = svg.getElementsByTagNameNS("http://www.w3.org/2000/svg", "text");
        for (int i = 0; i < texts.getLength(); i++) {
            text.append(texts.item(i).getTextContent()).append(' ');
        }
        assertEquals(expected, marks, "the same specifications in the same order");
        String caption = text.toString();
        assertTrue(caption.contains("Run " + run + " of analysis \"figure\""), caption);
        assertTrue(caption.contains("grouped by"), caption);
        assertTrue(caption.contains("Coloured by"), caption);
    }

    @Test
    void thePdfAndPngAreThePageWidth() throws Exception {
        MockHttpServletResponse pdf = mvc.perform(get(base + "/figure").param("format", "pdf").param("size", "page")
                .param("scale", "standardized")).andExpect(status().isOk()).andReturn().getResponse();
        assertEquals("application/pdf", pdf.getContentType());
        try (PDDocument d = Loader.loadPDF(pdf.getContentAsByteArray())) {
            assertEquals(1, d.getNumberOfPages());
            assertEquals(183 * MM, d.getPage(0).getMediaBox().getWidth(), 0.01);
        }
        MockHttpServletResponse png = mvc.perform(get(base + "/figure").param("format", "png"))
                .andExpect(status().isOk()).andReturn().getResponse();
        assertEquals("image/png", png.getContentType());
        assertEquals(Math.ceil(89 * MM * 300 / 72), ImageIO.read(new ByteArrayInputStream(png.getContentAsByteArray()))
                .getWidth(), 0.5);
    }

    /** On the standardized scale a logit has no value: the caption counts those left out, as the curve does. */
    @Test
    void aScaleUndefinedForAModelLeavesItsSpecificationsOutAndSaysSo() throws Exception {
        String models = upload("models.csv", CivicTestData.csvWithFollowUp(200, 4));
        String modelRun = runToEnd(models, CivicTestData.modelPlan());
        String at = "/api/analyses/" + models + "/runs/" + modelRun;
        JsonNode curve = json(mvc.perform(get(at + "/curve").param("scale", "standardized")).andReturn().getResponse()
                .getContentAsString());
        assertEquals(8, curve.path("leftOut").asInt());
        String svg = mvc.perform(get(at + "/figure").param("scale", "standardized")).andExpect(status().isOk())
                .andReturn().getResponse().getContentAsString();
        assertEquals(curve.path("curve").path("count").asInt(), svg.split("<g id='spec-", -1).length - 1);
        assertTrue(svg.replaceAll("<[^>]*>", " ").replaceAll("\\s+", " ").contains("The scale is defined for least "
                + "squares only: 8 logit, probit or Poisson specifications of the run are left out."), svg);
    }

    @Test
    void badParametersAreFourHundredWithTheirName() throws Exception {
        mvc.perform(get(base + "/figure").param("format", "gif")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("format"));
        mvc.perform(get(base + "/figure").param("size", "poster")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("size"));
        mvc.perform(get(base + "/figure").param("colour", "99")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("colour"));
        mvc.perform(get(base + "/figure").param("scale", "odds")).andExpect(status().isBadRequest())
                .andExpect(jsonPath("$.where").value("scale"));
    }
}
