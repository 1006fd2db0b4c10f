package org.stackwright.fft;

/**
 * Complex 1D DFT of length n = 2^a 3^b 5^c applied to several lines at once: a Stockham autosort FFT (radices 4,
 * 2, 3, 5) whose data hold {@code width} lines side by side, element e of line j at index {@code e*width + j}, real
 * and imaginary parts in separate arrays. Every butterfly then runs over a contiguous run of lines with one twiddle
 * factor, a loop the JIT compiles to vector instructions, instead of one scalar line at a time.
 *
 * <p>Algorithm: Stockham autosort formulation of the Cooley-Tukey FFT (Cooley &amp; Tukey 1965; Van Loan,
 * Computational Frameworks for the Fast Fourier Transform, 1992, section 1.7): stage with radix r on length n,
 * stride s, m = n/r: y[s(rp+j)+q] = w_n^(pj) sum_k x[s(p+km)+q] w_r^(jk), then n := m, s := s r.
 *
 * <p>Forward uses exp(-2 pi i k x / n), inverse exp(+...) scaled by 1/n (as JTransforms' complexInverse with
 * scaling). Each line is computed by the same operations whatever the width or its neighbours, so results do not
 * depend on how lines are grouped or on the thread count. Twiddles are computed in double and stored as float.
 */
final class LineFft {

    private final int n;
    private final int[] radix;
    /** per stage: cos and -sin of 2 pi p j / n_stage for p < m, 0 < j < r, at index p*(r-1) + j-1 */
    private final float[][] cos;
    private final float[][] sin;

    LineFft(int n) {
        if (!FastSizes.isFast(n)) {
            throw new IllegalArgumentException("line FFT length must be a product of 2, 3 and 5 (given " + n + ")");
        }
        this.n = n;
        int[] tmp = new int[32];
        int k = 0;
        int rest = n;
        while (rest % 4 == 0) {
            tmp[k++] = 4;
            rest /= 4;
        }
        for (int p : new int[] {2, 3, 5}) {
            while (rest % p == 0) {
                tmp[k++] = p;
                rest /= p;
            }
        }
        radix = java.util.Arrays.copyOf(tmp, k);
        cos = new float[k][];
        sin = new float[k][];
        int len = n;
        for (int st = 0; st < k; st++) {
            int r = radix[st];
            int m = len / r;
            cos[st] = new float[m * (r - 1)];
            sin[st] = new float[m * (r - 1)];
            for (int p = 0; p < m; p++) {
                for (int j = 1; j < r; j++) {
                    double a = -2 * Math.PI * ((long) p * j % len) / len;
                    cos[st][p * (r - 1) + j - 1] = (float) Math.cos(a);
                    sin[st][p * (r - 1) + j - 1] = (float) Math.sin(a);
                }
            }
            len = m;
        }
    }

    int length() {
        return n;
    }

    /**
     * Transforms {@code width} lines held in (re, im), using (tre, tim) as work space of the same size.
     *
     * @return true when the result is in (re, im), false when it is in (tre, tim)
     */
    boolean transform(float[] re, float[] im, float[] tre, float[] tim, int width, boolean forward) {
        float[] xr = re;
        float[] xi = im;
        float[] yr = tre;
        float[] yi = tim;
        float sg = forward ? 1f : -1f;
        int len = n;
        int s = 1;
        for (int st = 0; st < radix.length; st++) {
            int r = radix[st];
            int m = len / r;
            int run = s * width;
            switch (r) {
                case 4 -> radix4(xr, xi, yr, yi, m, run, cos[st], sin[st], sg);
                case 2 -> radix2(xr, xi, yr, yi, m, run, cos[st], sin[st], sg);
                case 3 -> radix3(xr, xi, yr, yi, m, run, cos[st], sin[st], sg);
                default -> radix5(xr, xi, yr, yi, m, run, cos[st], sin[st], sg);
            }
            float[] t = xr;
            xr = yr;
            yr = t;
            t = xi;
            xi = yi;
            yi = t;
            len = m;
            s *= r;
        }
        if (!forward) {
            float scale = 1f / n;
            int total = n * width;
            for (int i = 0; i < total; i++) {
                xr[i] *= scale;
                xi[i] *= scale;
            }
        }
        return xr == re;
    }

    private static void radix2(float[] xr, float[] xi, float[] yr, float[] yi, int m, int run,
            float[] cs, float[] sn, float sg) {
        for (int p = 0; p < m; p++) {
            float c = cs[p];
            float w = sg * sn[p];
            int a0 = p * run;
            int a1 = (p + m) * run;
            int b0 = 2 * p * run;
            int b1 = b0 + run;
            for (int t = 0; t < run; t++) {
                float ar = xr[a0 + t];
                float ai = xi[a0 + t];
                float br = xr[a1 + t];
                float bi = xi[a1 + t];
                yr[b0 + t] = ar + br;
                yi[b0 + t] = ai + bi;
                float dr = ar - br;
                float di = ai - bi;
                yr[b1 + t] = dr * c - di * w;
                yi[b1 + t] = dr * w + di * c;
            }
        }
    }

    private static void radix4(float[] xr, float[] xi, float[] yr, float[] yi, int m, int run,
            float[] cs, float[] sn, float sg) {
        for (int p = 0; p < m; p++) {
            float c1 = cs[3 * p];
            float w1 = sg * sn[3 * p];
            float c2 = cs[3 * p + 1];
            float w2 = sg * sn[3 * p + 1];
            float c3 = cs[3 * p + 2];
            float w3 = sg * sn[3 * p + 2];
            int a0 = p * run;
            int a1 = (p + m) * run;
            int a2 = (p + 2 * m) * run;
            int a3 = (p + 3 * m) * run;
            int b0 = 4 * p * run;
            int b1 = b0 + run;
            int b2 = b1 + run;
            int b3 = b2 + run;
            for (int t = 0; t < run; t++) {
                float x0r = xr[a0 + t];
                float x0i = xi[a0 + t];
                float x1r = xr[a1 + t];
                float x1i = xi[a1 + t];
                float x2r = xr[a2 + t];
                float x2i = xi[a2 + t];
                float x3r = xr[a3 + t];
                float x3i = xi[a3 + t];
                float s02r = x0r + x2r;
                float s02i = x0i + x2i;
                float d02r = x0r - x2r;
                float d02i = x0i - x2i;
                float s13r = x1r + x3r;
                float s13i = x1i + x3i;
                // v = sg * (-i) (x1 - x3)
                float vr = sg * (x1i - x3i);
                float vi = -sg * (x1r - x3r);
                yr[b0 + t] = s02r + s13r;
                yi[b0 + t] = s02i + s13i;
                float c1r = d02r + vr;
                float c1i = d02i + vi;
                yr[b1 + t] = c1r * c1 - c1i * w1;
                yi[b1 + t] = c1r * w1 + c1i * c1;
                float c2r = s02r - s13r;
                float c2i = s02i - s13i;
                yr[b2 + t] = c2r * c2 - c2i * w2;
                yi[b2 + t] = c2r * w2 + c2i * c2;
                float c3r = d02r - vr;
                float c3i = d02i - vi;
                yr[b3 + t] = c3r * c3 - c3i * w3;
                yi[b3 + t] = c3r * w3 + c3i * c3;
            }
        }
    }

    private static final float SIN60 = (float) (Math.sqrt(3) / 2);

    private static void radix3(float[] xr, float[] xi, float[] yr, float[] yi, int m, int run,
            float[] cs, float[] sn, float sg) {
        float h = sg * SIN60;
        for (int p = 0; p < m; p++) {
            float c1 = cs[2 * p];
            float w1 = sg * sn[2 * p];
            float c2 = cs[2 * p + 1];
            float w2 = sg * sn[2 * p + 1];
            int a0 = p * run;
            int a1 = (p + m) * run;
            int a2 = (p + 2 * m) * run;
            int b0 = 3 * p * run;
            int b1 = b0 + run;
            int b2 = b1 + run;
            for (int t = 0; t < run; t++) {
                float x0r = xr[a0 + t];
                float x0i = xi[a0 + t];
                float x1r = xr[a1 + t];
                float x1i = xi[a1 + t];
                float x2r = xr[a2 + t];
                float x2i = xi[a2 + t];
                float tr = x1r + x2r;
                float ti = x1i + x2i;
                float mr = x0r - 0.5f * tr;
                float mi = x0i - 0.5f * ti;
                // u = sg * sin60 * (-i) (x1 - x2)
                float ur = h * (x1i - x2i);
                float ui = -h * (x1r - x2r);
                yr[b0 + t] = x0r + tr;
                yi[b0 + t] = x0i + ti;
                float q1r = mr + ur;
                float q1i = mi + ui;
                yr[b1 + t] = q1r * c1 - q1i * w1;
                yi[b1 + t] = q1r * w1 + q1i * c1;
                float q2r = mr - ur;
                float q2i = mi - ui;
                yr[b2 + t] = q2r * c2 - q2i * w2;
                yi[b2 + t] = q2r * w2 + q2i * c2;
            }
        }
    }

    private static final float C72 = (float) Math.cos(2 * Math.PI / 5);
    private static final float C144 = (float) Math.cos(4 * Math.PI / 5);
    private static final float S72 = (float) Math.sin(2 * Math.PI / 5);
    private static final float S144 = (float) Math.sin(4 * Math.PI / 5);

    private static void radix5(float[] xr, float[] xi, float[] yr, float[] yi, int m, int run,
            float[] cs, float[] sn, float sg) {
        float s1 = sg * S72;
        float s2 = sg * S144;
        for (int p = 0; p < m; p++) {
            int a0 = p * run;
            int a1 = (p + m) * run;
            int a2 = (p + 2 * m) * run;
            int a3 = (p + 3 * m) * run;
            int a4 = (p + 4 * m) * run;
            int b0 = 5 * p * run;
            float c1 = cs[4 * p];
            float w1 = sg * sn[4 * p];
            float c2 = cs[4 * p + 1];
            float w2 = sg * sn[4 * p + 1];
            float c3 = cs[4 * p + 2];
            float w3 = sg * sn[4 * p + 2];
            float c4 = cs[4 * p + 3];
            float w4 = sg * sn[4 * p + 3];
            for (int t = 0; t < run; t++) {
                float x0r = xr[a0 + t];
                float x0i = xi[a0 + t];
                float p14r = xr[a1 + t] + xr[a4 + t];
                float p14i = xi[a1 + t] + xi[a4 + t];
                float m14r = xr[a1 + t] - xr[a4 + t];
                float m14i = xi[a1 + t] - xi[a4 + t];
                float p23r = xr[a2 + t] + xr[a3 + t];
                float p23i = xi[a2 + t] + xi[a3 + t];
                float m23r = xr[a2 + t] - xr[a3 + t];
                float m23i = xi[a2 + t] - xi[a3 + t];
                // c_j = x0 + cos-part +/- (-i sg) sin-part (forward w5 = exp(-2 pi i / 5))
                float e1r = x0r + C72 * p14r + C144 * p23r;
                float e1i = x0i + C72 * p14i + C144 * p23i;
                float e2r = x0r + C144 * p14r + C72 * p23r;
                float e2i = x0i + C144 * p14i + C72 * p23i;
                float f1r = s1 * m14i + s2 * m23i;
                float f1i = -(s1 * m14r + s2 * m23r);
                float f2r = s2 * m14i - s1 * m23i;
                float f2i = -(s2 * m14r - s1 * m23r);
                yr[b0 + t] = x0r + p14r + p23r;
                yi[b0 + t] = x0i + p14i + p23i;
                float q1r = e1r + f1r;
                float q1i = e1i + f1i;
                float q2r = e2r + f2r;
                float q2i = e2i + f2i;
                float q3r = e2r - f2r;
                float q3i = e2i - f2i;
                float q4r = e1r - f1r;
                float q4i = e1i - f1i;
                int b = b0 + run + t;
                yr[b] = q1r * c1 - q1i * w1;
                yi[b] = q1r * w1 + q1i * c1;
                b += run;
                yr[b] = q2r * c2 - q2i * w2;
                yi[b] = q2r * w2 + q2i * c2;
                b += run;
                yr[b] = q3r * c3 - q3i * w3;
                yi[b] = q3r * w3 + q3i * c3;
                b += run;
                yr[b] = q4r * c4 - q4i * w4;
                yi[b] = q4r * w4 + q4i * c4;
            }
        }
    }
}
