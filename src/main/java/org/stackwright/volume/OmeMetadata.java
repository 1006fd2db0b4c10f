package org.stackwright.volume;

import java.io.IOException;
import java.io.StringReader;
import java.util.Locale;

import javax.xml.XMLConstants;
import javax.xml.parsers.DocumentBuilder;
import javax.xml.parsers.DocumentBuilderFactory;
import javax.xml.parsers.ParserConfigurationException;

import org.w3c.dom.Document;
import org.w3c.dom.Element;
import org.w3c.dom.NodeList;
import org.xml.sax.InputSource;
import org.xml.sax.SAXException;

import ij.ImagePlus;
import ij.ImageStack;
import ij.measure.Calibration;

/**
 * What ImageJ 1.x does not read from an OME-TIFF: the OME-XML in the first image's ImageDescription (OME data
 * model, Goldberg et al., "The Open Microscopy Environment (OME) Data Model and XML file", Genome Biology 6, 2005;
 * schema 2016-06). Without it ImageJ opens an OME-TIFF as a plain stack of 1 um voxels, with channels and time
 * points interleaved into z. From the first {@code Pixels} element this reads PhysicalSizeX/Y/Z with their units
 * and SizeC/SizeZ/SizeT with DimensionOrder, and {@link #apply}s them: the voxel size in micrometres, and the
 * planes put into ImageJ's channel-slice-frame order when their count matches.
 *
 * <p>The XML is parsed by the JDK's parser with secure settings: no DOCTYPE, no external entities or schemas, no
 * XInclude (a crafted file can neither read local files nor expand entities without bound).
 */
public final class OmeMetadata {

    /**
     * @param sizeX voxel width in um, or NaN when not given (or not a length)
     * @param sizeY voxel height in um, or NaN
     * @param sizeZ z step in um, or NaN
     * @param channels SizeC (1 when absent)
     * @param slices SizeZ
     * @param frames SizeT
     * @param order DimensionOrder, e.g. "XYCZT" (the ImageJ order), "XYZCT"
     */
    public record Pixels(double sizeX, double sizeY, double sizeZ, int channels, int slices, int frames, String order) {
    }

    private OmeMetadata() {
    }

    /**
     * @param description the ImageDescription of the first image (may be null or not OME)
     * @return the first Pixels element, or null when the description holds no OME-XML or cannot be parsed
     */
    public static Pixels parse(String description) {
        if (description == null || !description.contains("<OME")) {
            return null;
        }
        Document doc;
        try {
            doc = secureBuilder().parse(new InputSource(new StringReader(description.trim())));
        } catch (SAXException | IOException | ParserConfigurationException e) {
            return null;
        }
        NodeList list = doc.getElementsByTagNameNS("*", "Pixels");
        if (list.getLength() == 0) {
            return null;
        }
        Element p = (Element) list.item(0);
        return new Pixels(length(p, "PhysicalSizeX"), length(p, "PhysicalSizeY"), length(p, "PhysicalSizeZ"),
                count(p, "SizeC"), count(p, "SizeZ"), count(p, "SizeT"), p.getAttribute("DimensionOrder"));
    }

    private static DocumentBuilder secureBuilder() throws ParserConfigurationException {
        DocumentBuilderFactory f = DocumentBuilderFactory.newInstance();
        f.setNamespaceAware(true);
        f.setFeature(XMLConstants.FEATURE_SECURE_PROCESSING, true);
        f.setFeature("http://apache.org/xml/features/disallow-doctype-decl", true);
        f.setFeature("http://xml.org/sax/features/external-general-entities", false);
        f.setFeature("http://xml.org/sax/features/external-parameter-entities", false);
        f.setAttribute(XMLConstants.ACCESS_EXTERNAL_DTD, "");
        f.setAttribute(XMLConstants.ACCESS_EXTERNAL_SCHEMA, "");
        f.setXIncludeAware(false);
        f.setExpandEntityReferences(false);
        DocumentBuilder b = f.newDocumentBuilder();
        b.setErrorHandler(null);
        return b;
    }

    private static int count(Element p, String name) {
        try {
            return Math.max(1, Integer.parseInt(p.getAttribute(name).trim()));
        } catch (NumberFormatException e) {
            return 1;
        }
    }

    /** @return the attribute in um (unit attribute name + "Unit", default um as in the schema), NaN when absent */
    private static double length(Element p, String name) {
        String v = p.getAttribute(name);
        if (v.isEmpty()) {
            return Double.NaN;
        }
        double d;
        try {
            d = Double.parseDouble(v.trim());
        } catch (NumberFormatException e) {
            return Double.NaN;
        }
        String unit = p.getAttribute(name + "Unit");
        double f = unit.isEmpty() ? 1 : micrometresPer(unit);
        return d > 0 && Double.isFinite(d) && f > 0 ? d * f : Double.NaN;
    }

    /** @return micrometres per unit of the OME UnitsLength enumeration (SI and inch), -1 for others (pixel ...) */
    static double micrometresPer(String unit) {
        return switch (unit.trim()) {
            case "µm", "um" -> 1;
            case "nm" -> 1e-3;
            case "pm" -> 1e-6;
            case "Å" -> 1e-4;
            case "mm" -> 1e3;
            case "cm" -> 1e4;
            case "dm" -> 1e5;
            case "m" -> 1e6;
            case "in" -> 25400;
            default -> -1;
        };
    }

    /**
     * Applies what ImageJ missed: the voxel size when ImageJ found no length calibration, and the channel, slice
     * and frame structure when ImageJ opened a flat stack whose plane count matches SizeC x SizeZ x SizeT.
     *
     * @param imp the image as ImageJ opened it; modified (calibration, stack order, dimensions)
     * @param p the parsed metadata
     * @return the image to use: imp itself, or a new image with the planes in ImageJ's order
     */
    public static ImagePlus apply(ImagePlus imp, Pixels p) {
        ImagePlus out = imp;
        int planes = imp.getStackSize();
        boolean flat = imp.getNChannels() == 1 && imp.getNFrames() == 1;
        if (flat && (p.channels() > 1 || p.frames() > 1) && (long) p.channels() * p.slices() * p.frames() == planes) {
            out = reorder(imp, p);
        }
        if (!ImagePlusAdapter.isCalibrated(out) && Double.isFinite(p.sizeX())) {
            Calibration cal = out.getCalibration().copy();
            cal.setUnit("micron");
            cal.pixelWidth = p.sizeX();
            cal.pixelHeight = Double.isFinite(p.sizeY()) ? p.sizeY() : p.sizeX();
            cal.pixelDepth = Double.isFinite(p.sizeZ()) ? p.sizeZ() : cal.pixelWidth;
            out.setCalibration(cal);
        }
        return out;
    }

    /** The planes in ImageJ's order (channel fastest, then slice, then frame) from the file's DimensionOrder. */
    private static ImagePlus reorder(ImagePlus imp, Pixels p) {
        String order = p.order() == null ? "" : p.order().toUpperCase(Locale.ROOT);
        if (order.length() != 5 || !order.startsWith("XY") || order.chars().distinct().count() != 5
                || order.indexOf('C') < 0 || order.indexOf('Z') < 0 || order.indexOf('T') < 0) {
            order = "XYCZT";
        }
        int[] size = new int[128];
        size['C'] = p.channels();
        size['Z'] = p.slices();
        size['T'] = p.frames();
        ImageStack in = imp.getStack();
        ImageStack st = new ImageStack(imp.getWidth(), imp.getHeight());
        for (int t = 0; t < p.frames(); t++) {
            for (int z = 0; z < p.slices(); z++) {
                for (int c = 0; c < p.channels(); c++) {
                    int[] at = new int[128];
                    at['C'] = c;
                    at['Z'] = z;
                    at['T'] = t;
                    // file plane index: the third letter of DimensionOrder varies fastest
                    char a = order.charAt(2);
                    char b = order.charAt(3);
                    char d = order.charAt(4);
                    int index = at[a] + size[a] * (at[b] + size[b] * at[d]);
                    st.addSlice(in.getSliceLabel(index + 1), in.getProcessor(index + 1));
                }
            }
        }
        ImagePlus out = new ImagePlus(imp.getTitle(), st);
        out.setCalibration(imp.getCalibration().copy());
        out.setDimensions(p.channels(), p.slices(), p.frames());
        out.setOpenAsHyperStack(true);
        return out;
    }
}
