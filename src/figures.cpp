// Figures with PLplot's SVG driver. PLplot keeps global state, so one figure is drawn at a
// time under a mutex, each on a fresh stream written to a private temporary file.
#include "coilwright/figures.hpp"

#include <plplot.h>

#include <algorithm>
#include <array>
#include <cstdint>
#include <atomic>
#include <cmath>
#include <fstream>
#include <limits>
#include <mutex>
#include <sstream>

#include <unistd.h>

#include <fmt/format.h>

#include "coilwright/error.hpp"
#include "coilwright/field.hpp"
#include "coilwright/field_map.hpp"
#include "coilwright/metrics.hpp"

namespace coilwright {

void FigureOptions::validate() const {
  if (!(width_pt >= 100.0 && width_pt <= 2000.0))
    throw InputError(fmt::format("figure options: width_pt = {} must lie in [100, 2000]", width_pt));
  if (!(height_pt >= 80.0 && height_pt <= 2000.0))
    throw InputError(fmt::format("figure options: height_pt = {} must lie in [80, 2000]", height_pt));
  if (!(text_scale > 0.3 && text_scale < 4.0))
    throw InputError(fmt::format("figure options: text_scale = {} must lie in (0.3, 4)", text_scale));
  if (map_points < 11 || map_points > 401)
    throw InputError(fmt::format("figure options: map_points = {} must lie in [11, 401]", map_points));
  if (profile_points < 21 || profile_points > 5001)
    throw InputError(fmt::format("figure options: profile_points = {} must lie in [21, 5001]", profile_points));
}

namespace detail {
namespace {

// Colour map 0 (our own choice): index 0 background, 1 ink, then line colours.
enum Ink : PLINT { kPaper = 0, kInk = 1, kGrey = 2, kRed = 3, kBlue = 4, kGreen = 5, kOrange = 6, kPurple = 7, kBand = 8, kTeal = 9 };
constexpr PLINT kLineColours[] = {kBlue, kRed, kGreen, kOrange, kPurple, kTeal};
constexpr PLINT kLineStyles[] = {1, 2, 3, 4, 5, 6};

std::string merge_fills(const std::string& svg);

std::mutex& plot_mutex() {
  static std::mutex m;
  return m;
}

// One PLplot page written to a temporary SVG file and read back.
class Page {
 public:
  explicit Page(const FigureOptions& o) : lock_(plot_mutex()) {
    o.validate();
    static std::atomic<unsigned> counter{0};
    file_ = std::filesystem::temp_directory_path() /
            fmt::format("coilwright-figure-{}-{}.svg", static_cast<long>(::getpid()), counter.fetch_add(1));
    plmkstrm(&stream_);
    plsdev("svg");
    plsfnam(file_.c_str());
    plspage(0.0, 0.0, static_cast<PLINT>(o.width_pt), static_cast<PLINT>(o.height_pt), 0, 0);
    static constexpr int kRgb[][3] = {{255, 255, 255}, {0, 0, 0},     {140, 140, 140}, {196, 40, 52},  {30, 86, 176},
                                      {34, 132, 68},   {222, 136, 24}, {122, 62, 150},  {222, 232, 246}, {20, 150, 150}};
    plscmap0n(16);
    for (PLINT i = 0; i < 10; ++i) plscol0(i, kRgb[i][0], kRgb[i][1], kRgb[i][2]);
    plinit();
    pladv(0);
    plschr(0.0, o.text_scale);
    plwidth(0.8);
  }
  Page(const Page&) = delete;
  Page& operator=(const Page&) = delete;
  ~Page() {
    if (!ended_) plend1();
    std::error_code ec;
    std::filesystem::remove(file_, ec);
  }
  // An SVG element drawn beneath PLplot's output (after the page background).
  void add_underlay(std::string element) { underlay_ += element; }
  std::string finish() {
    plend1();
    ended_ = true;
    std::ifstream in(file_, std::ios::binary);
    std::stringstream ss;
    ss << in.rdbuf();
    if (!in && !in.eof()) throw std::runtime_error("figure: could not read back " + file_.string());
    std::string svg = merge_fills(ss.str());
    if (!underlay_.empty()) {
      const std::size_t g = svg.find("<g");
      if (g != std::string::npos) svg.insert(g, underlay_);
    }
    return svg;
  }

 private:
  std::lock_guard<std::mutex> lock_;
  std::filesystem::path file_;
  PLINT stream_ = 0;
  bool ended_ = false;
  std::string underlay_;
};


// PLplot writes every filled cell of a shaded map as its own element with a zero-width
// outline, which leaves hairline seams when rendered and makes maps megabytes large. Runs of
// consecutive fills are merged here into one path per colour, outlined in their own colour.
std::string attribute(std::string_view element, std::string_view name) {
  const std::string key = std::string(name) + "=\"";
  std::size_t at = 0;
  while ((at = element.find(key, at)) != std::string_view::npos) {
    if (at == 0 || element[at - 1] == ' ' || element[at - 1] == '\n' || element[at - 1] == '\t') break;
    at += key.size();
  }
  if (at == std::string_view::npos) return {};
  const std::size_t begin = at + key.size(), end = element.find('"', begin);
  return std::string(element.substr(begin, end - begin));
}

std::string merge_fills(const std::string& svg) {
  std::string out;
  out.reserve(svg.size() / 4);
  std::vector<std::string> colours;
  std::vector<std::string> paths;
  auto flush = [&] {
    for (std::size_t i = 0; i < colours.size(); ++i)
      out += fmt::format("<path fill=\"{0}\" stroke=\"{0}\" stroke-width=\"0.3\" stroke-linejoin=\"round\" d=\"{1}\"/>\n", colours[i],
                         paths[i]);
    colours.clear();
    paths.clear();
  };
  std::size_t pos = 0;
  while (true) {
    const std::size_t a = svg.find("<polyline", pos);
    if (a == std::string::npos) {
      flush();
      out.append(svg, pos, std::string::npos);
      break;
    }
    const std::size_t b = svg.find("/>", a);
    if (b == std::string::npos) {
      flush();
      out.append(svg, pos, std::string::npos);
      break;
    }
    const std::string_view element(svg.data() + a, b + 2 - a);
    const std::string_view between(svg.data() + pos, a - pos);
    const std::string fill = attribute(element, "fill");
    const bool is_fill = !fill.empty() && fill != "none" && attribute(element, "stroke-width") == "0.000000e+00" &&
                         attribute(element, "fill-opacity") == "1.000000";
    if (!is_fill || between.find_first_not_of(" \n\t\r") != std::string_view::npos) {
      flush();
      out.append(between);
    }
    if (is_fill) {
      std::string d;
      bool first = true;
      std::string pts = attribute(element, "points");
      std::size_t p = 0;
      while (p < pts.size()) {
        const std::size_t q = pts.find(' ', p);
        const std::string pair = pts.substr(p, q == std::string::npos ? std::string::npos : q - p);
        if (!pair.empty()) {
          d += first ? 'M' : 'L';
          d += pair;
          first = false;
        }
        if (q == std::string::npos) break;
        p = q + 1;
      }
      d += 'Z';
      auto it = std::find(colours.begin(), colours.end(), fill);
      if (it == colours.end()) {
        colours.push_back(fill);
        paths.push_back(std::move(d));
      } else {
        paths[static_cast<std::size_t>(it - colours.begin())] += d;
      }
    } else {
      out.append(element);
    }
    pos = b + 2;
  }
  return out;
}

struct Scale {
  double factor;      // multiply tesla by this
  std::string label;  // PLplot text
};

Scale field_scale(double max_abs_T) {
  if (max_abs_T >= 0.5) return {1.0, "T"};
  if (max_abs_T >= 0.5e-3) return {1e3, "mT"};
  if (max_abs_T >= 0.5e-6) return {1e6, "#gmT"};
  return {1e9, "nT"};
}

Scale deviation_scale(double tolerance_relative) {
  if (tolerance_relative > 0.0 && tolerance_relative < 1e-3) return {1e6, "ppm"};
  return {1e2, "%"};
}

// "x", "y" or "z" when v is (minus) a coordinate axis, else the name given.
std::string axis_name(const Vec3& v, const std::string& otherwise) {
  static constexpr const char* kNames[] = {"x", "y", "z"};
  for (int i = 0; i < 3; ++i)
    if (std::abs(std::abs(v[i]) - 1.0) < 1e-12) return v[i] > 0 ? kNames[i] : std::string("-") + kNames[i];
  return otherwise;
}

Frame target_frame(const Target& t) { return Frame::from_axis(t.axis, t.reference); }

// The region's half-size across its axis.
double radial_extent(const Target& t) {
  switch (t.region) {
    case RegionKind::sphere:
    case RegionKind::cylinder: return t.radius_m;
    case RegionKind::box:
    case RegionKind::plane: return 0.5 * std::max(t.size_m.x(), t.size_m.y());
    case RegionKind::points: {
      double m = 0.0;
      const Vec3 a = t.axis.normalized();
      for (std::size_t i = 0; i < t.points.size(); ++i) {
        const Vec3 d = t.points[i] - t.centre_m;
        m = std::max(m, (d - d.dot(a) * a).norm());
      }
      return m;
    }
  }
  return 0.0;
}

double axial_extent(const Target& t) {
  const double h = half_extent_along_axis(t);
  return h > 0.0 ? h : radial_extent(t);
}

using Polyline = std::vector<Vec3>;

Polyline circle(const Vec3& c, const Vec3& a, const Vec3& b, double r, int n = 96) {
  Polyline p;
  for (int i = 0; i <= n; ++i) {
    const double t = 2.0 * M_PI * i / n;
    p.push_back(c + r * (std::cos(t) * a + std::sin(t) * b));
  }
  return p;
}

// Outlines of one physical winding in 3-D.
std::vector<Polyline> winding_outline(const Coil& c, const Vec3& centre) {
  const Frame f = Frame::from_axis(c.axis, c.width_axis);
  std::vector<Polyline> out;
  auto ring_pack = [&](double ri, double ro, double w) {
    for (double z : {-0.5 * w, 0.5 * w}) {
      out.push_back(circle(centre + z * f.w, f.u, f.v, ro));
      if (ri > 0.0) out.push_back(circle(centre + z * f.w, f.u, f.v, ri));
    }
    for (int k = 0; k < 4; ++k) {
      const double t = 0.5 * M_PI * k;
      const Vec3 e = std::cos(t) * f.u + std::sin(t) * f.v;
      out.push_back({centre + ri * e - 0.5 * w * f.w, centre + ro * e - 0.5 * w * f.w, centre + ro * e + 0.5 * w * f.w,
                     centre + ri * e + 0.5 * w * f.w, centre + ri * e - 0.5 * w * f.w});
    }
  };
  auto rectangle = [&](double w, double h, const Vec3& at) {
    const Vec3 a = 0.5 * w * f.u, b = 0.5 * h * f.v;
    out.push_back({at - a - b, at + a - b, at + a + b, at - a + b, at - a - b});
  };
  switch (c.shape) {
    case Shape::loop: out.push_back(circle(centre, f.u, f.v, c.radius_m)); break;
    case Shape::pack: ring_pack(c.inner_radius_m, c.outer_radius_m, c.width_m); break;
    case Shape::solenoid:
      if (c.multilayer())
        ring_pack(c.inner_radius_m, c.outer_radius_m, c.length_m);
      else
        ring_pack(c.radius_m, c.radius_m, c.length_m);
      break;
    case Shape::rectangle:
      if (c.thick_rectangle()) {
        for (double z : {-0.5 * c.thickness_m, 0.5 * c.thickness_m})
          for (double d : {-c.depth_m, c.depth_m}) rectangle(c.width_m + d, c.height_m + d, centre + z * f.w);
      } else {
        rectangle(c.width_m, c.height_m, centre);
      }
      break;
    case Shape::polygon: {
      Polyline p;
      for (const Vec3& v : c.vertices_m) p.push_back(centre + v);
      if (!c.vertices_m.empty()) p.push_back(centre + c.vertices_m.front());
      out.push_back(std::move(p));
      break;
    }
  }
  return out;
}

// The target region's outline as seen in a view with in-plane directions h and v (through
// the target centre for sections; projections otherwise).
std::vector<Polyline> target_outline(const Target& t, const Vec3& h, const Vec3& v) {
  const Frame f = target_frame(t);
  std::vector<Polyline> out;
  switch (t.region) {
    case RegionKind::sphere: out.push_back(circle(t.centre_m, h, v, t.radius_m)); break;
    case RegionKind::cylinder: {
      const Vec3 a = 0.5 * t.length_m * f.w;
      for (const Vec3& z : {Vec3(-a), Vec3(a)}) out.push_back(circle(t.centre_m + z, f.u, f.v, t.radius_m));
      // The silhouette: the generators seen edge-on from the view's normal.
      const Vec3 n = h.cross(v);
      Vec3 side = f.w.cross(n);
      if (side.norm() < 1e-9) side = f.u;
      side = side.normalized() * t.radius_m;
      out.push_back({t.centre_m - a + side, t.centre_m + a + side});
      out.push_back({t.centre_m - a - side, t.centre_m + a - side});
      break;
    }
    case RegionKind::box:
    case RegionKind::plane: {
      const Frame bf = Frame::from_axis(t.axis, t.reference);
      const Vec3 ex = 0.5 * t.size_m.x() * bf.u, ey = 0.5 * t.size_m.y() * bf.v, ez = 0.5 * t.size_m.z() * bf.w;
      for (double s : {-1.0, 1.0}) {
        const Vec3 c = t.centre_m + s * ez;
        out.push_back({c - ex - ey, c + ex - ey, c + ex + ey, c - ex + ey, c - ex - ey});
      }
      for (const Vec3& corner : {Vec3(-ex - ey), Vec3(ex - ey), Vec3(ex + ey), Vec3(-ex + ey)})
        out.push_back({t.centre_m + corner - ez, t.centre_m + corner + ez});
      break;
    }
    case RegionKind::points: break;  // drawn as dots by the caller
  }
  return out;
}

// Draws 3-D polylines projected on (h, v) about `origin`, in millimetres.
void draw_projected(const std::vector<Polyline>& lines, const Vec3& origin, const Vec3& h, const Vec3& v) {
  std::vector<PLFLT> x, y;
  for (const Polyline& l : lines) {
    x.clear();
    y.clear();
    for (const Vec3& p : l) {
      x.push_back(1e3 * (p - origin).dot(h));
      y.push_back(1e3 * (p - origin).dot(v));
    }
    if (x.size() >= 2) plline(static_cast<PLINT>(x.size()), x.data(), y.data());
  }
}

void draw_points_region(const Target& t, const Vec3& origin, const Vec3& h, const Vec3& v) {
  std::vector<PLFLT> x, y;
  for (std::size_t i = 0; i < t.points.size(); ++i) {
    x.push_back(1e3 * (t.points[i] - origin).dot(h));
    y.push_back(1e3 * (t.points[i] - origin).dot(v));
  }
  if (!x.empty()) plpoin(static_cast<PLINT>(x.size()), x.data(), y.data(), 1);
}

// A polyline broken at NaN values.
void line_with_gaps(const std::vector<double>& x, const std::vector<double>& y) {
  std::vector<PLFLT> xs, ys;
  auto flush = [&] {
    if (xs.size() >= 2) plline(static_cast<PLINT>(xs.size()), xs.data(), ys.data());
    xs.clear();
    ys.clear();
  };
  for (std::size_t i = 0; i < x.size(); ++i) {
    if (!std::isfinite(y[i])) {
      flush();
      continue;
    }
    xs.push_back(x[i]);
    ys.push_back(y[i]);
  }
  flush();
}

void shade_band(double x0, double x1, double y0, double y1, PLINT colour) {
  PLFLT x[] = {x0, x1, x1, x0};
  PLFLT y[] = {y0, y0, y1, y1};
  plcol0(colour);
  plfill(4, x, y);
}

void vertical_line(double x, double y0, double y1) {
  PLFLT xs[] = {x, x}, ys[] = {y0, y1};
  plline(2, xs, ys);
}

// Axial samples of one design: position s along the axis [m] and the field there.
struct Profile {
  std::vector<double> s_m;
  std::vector<Vec3> field_T;   // coils plus ambient; NaN on windings
  std::vector<double> signed_relative;  // the signed deviation along the goal direction (|B|/ref for null goals)
  double half_extent_m = 0.0;
  GoalSpec goal;
};

Profile axial_profile(const Model& design, double span_factor, int n) {
  if (!design.target) throw InputError("figures: the design has no [target]; the profile and maps need one");
  const Target& t = *design.target;
  Profile p;
  p.goal = GoalSpec::from(t);
  p.half_extent_m = axial_extent(t);
  const Vec3 a = t.axis.normalized();
  const double span = span_factor * p.half_extent_m;
  const FieldMap map = compute_field_map(design, line_lattice(t.centre_m - span * a, t.centre_m + span * a, n));
  const Vec3 dir = p.goal.goal == Goal::uniform ? p.goal.field_T.normalized() : a;
  for (std::size_t i = 0; i < map.points.size(); ++i) {
    const Vec3 r = map.points[i];
    const double s = (r - t.centre_m).dot(a);
    const Vec3 b = map.field_T[i];
    p.s_m.push_back(s);
    p.field_T.push_back(b);
    double d = std::numeric_limits<double>::quiet_NaN();
    if (b.allFinite()) {
      switch (p.goal.goal) {
        case Goal::uniform: d = (b - p.goal.field_T).dot(dir) / p.goal.reference_T; break;
        case Goal::gradient:
          d = (b.dot(a) - (p.goal.field_T.dot(a) + p.goal.gradient_T_per_m * s)) / p.goal.reference_T;
          break;
        case Goal::null: d = b.norm() / p.goal.reference_T; break;
      }
    }
    p.signed_relative.push_back(d);
  }
  return p;
}

std::pair<double, double> finite_range(const std::vector<double>& v) {
  double lo = std::numeric_limits<double>::infinity(), hi = -lo;
  for (double x : v)
    if (std::isfinite(x)) {
      lo = std::min(lo, x);
      hi = std::max(hi, x);
    }
  if (!std::isfinite(lo)) return {0.0, 1.0};
  if (hi - lo < 1e-300 + 1e-12 * std::abs(hi)) {
    const double pad = std::abs(hi) > 0 ? 0.05 * std::abs(hi) : 1.0;
    return {lo - pad, hi + pad};
  }
  const double pad = 0.06 * (hi - lo);
  return {lo - pad, hi + pad};
}

// Custom labels for the log colour bar: 10^v printed plainly.
void log_label(PLINT, PLFLT value, char* label, PLINT length, PLPointer) {
  const double x = std::pow(10.0, value);
  std::snprintf(label, static_cast<std::size_t>(length), "%g", x);
}

// The colour scale of maps (our own): deep blue-violet through teal to pale yellow, t in [0, 1].
std::array<unsigned char, 3> map_colour(double t) {
  static constexpr double kPos[] = {0.0, 0.3, 0.6, 0.85, 1.0};
  static constexpr double kRgb[][3] = {{0.13, 0.07, 0.33}, {0.16, 0.33, 0.66}, {0.20, 0.62, 0.60}, {0.70, 0.84, 0.36}, {0.99, 0.97, 0.78}};
  t = std::clamp(t, 0.0, 1.0);
  int k = 0;
  while (k < 3 && t > kPos[k + 1]) ++k;
  const double f = (t - kPos[k]) / (kPos[k + 1] - kPos[k]);
  std::array<unsigned char, 3> c{};
  for (int i = 0; i < 3; ++i) c[i] = static_cast<unsigned char>(std::lround(255.0 * (kRgb[k][i] + f * (kRgb[k + 1][i] - kRgb[k][i]))));
  return c;
}

std::uint32_t crc32(const unsigned char* data, std::size_t n, std::uint32_t crc = 0) {
  // PNG's CRC-32 (ISO 3309 polynomial, reflected: 0xEDB88320), bitwise.
  crc = ~crc;
  for (std::size_t i = 0; i < n; ++i) {
    crc ^= data[i];
    for (int k = 0; k < 8; ++k) crc = (crc >> 1) ^ (0xEDB88320u & (0u - (crc & 1u)));
  }
  return ~crc;
}

// An RGB image (rows top to bottom) as a data: URI of a PNG (W3C PNG specification, 2nd ed.),
// compressed with stored deflate blocks only (RFC 1950/1951): no library needed, and maps are small.
std::string png_data_uri(int w, int h, const std::vector<unsigned char>& rgb) {
  std::vector<unsigned char> raw;
  raw.reserve(static_cast<std::size_t>(h) * (3 * w + 1));
  for (int y = 0; y < h; ++y) {
    raw.push_back(0);  // filter: none
    raw.insert(raw.end(), rgb.begin() + static_cast<std::ptrdiff_t>(y) * 3 * w, rgb.begin() + static_cast<std::ptrdiff_t>(y + 1) * 3 * w);
  }
  std::vector<unsigned char> z = {0x78, 0x01};
  std::uint32_t a = 1, b = 0;
  for (unsigned char c : raw) {
    a = (a + c) % 65521;
    b = (b + a) % 65521;
  }
  for (std::size_t at = 0; at < raw.size() || at == 0;) {
    const std::size_t len = std::min<std::size_t>(65535, raw.size() - at);
    const bool last = at + len >= raw.size();
    z.push_back(last ? 1 : 0);
    z.push_back(len & 0xff);
    z.push_back((len >> 8) & 0xff);
    z.push_back(~len & 0xff);
    z.push_back((~len >> 8) & 0xff);
    z.insert(z.end(), raw.begin() + static_cast<std::ptrdiff_t>(at), raw.begin() + static_cast<std::ptrdiff_t>(at + len));
    at += len;
    if (last) break;
  }
  const std::uint32_t adler = (b << 16) | a;
  for (int k = 3; k >= 0; --k) z.push_back((adler >> (8 * k)) & 0xff);
  std::vector<unsigned char> png = {0x89, 'P', 'N', 'G', '\r', '\n', 0x1a, '\n'};
  auto be32 = [&png](std::uint32_t v) {
    for (int k = 3; k >= 0; --k) png.push_back((v >> (8 * k)) & 0xff);
  };
  auto chunk = [&](const char* type, const std::vector<unsigned char>& data) {
    be32(static_cast<std::uint32_t>(data.size()));
    const std::size_t start = png.size();
    png.insert(png.end(), type, type + 4);
    png.insert(png.end(), data.begin(), data.end());
    be32(crc32(png.data() + start, png.size() - start));
  };
  std::vector<unsigned char> ihdr;
  for (std::uint32_t v : {static_cast<std::uint32_t>(w), static_cast<std::uint32_t>(h)})
    for (int k = 3; k >= 0; --k) ihdr.push_back((v >> (8 * k)) & 0xff);
  ihdr.insert(ihdr.end(), {8, 2, 0, 0, 0});  // 8 bits, RGB, deflate, adaptive filtering, no interlace
  chunk("IHDR", ihdr);
  chunk("IDAT", z);
  chunk("IEND", {});
  static constexpr char kB64[] = "ABCDEFGHIJKLMNOPQRSTUVWXYZabcdefghijklmnopqrstuvwxyz0123456789+/";
  std::string out = "data:image/png;base64,";
  for (std::size_t i = 0; i < png.size(); i += 3) {
    const std::uint32_t v = (static_cast<std::uint32_t>(png[i]) << 16) | (i + 1 < png.size() ? png[i + 1] << 8 : 0) |
                            (i + 2 < png.size() ? png[i + 2] : 0);
    out += kB64[(v >> 18) & 63];
    out += kB64[(v >> 12) & 63];
    out += i + 1 < png.size() ? kB64[(v >> 6) & 63] : '=';
    out += i + 2 < png.size() ? kB64[v & 63] : '=';
  }
  return out;
}

// An <image> filling the current viewport (PLplot's SVG page has its origin at the top left).
void image_in_viewport(Page& page, const FigureOptions& o, int w, int h, const std::vector<unsigned char>& rgb) {
  PLFLT vx0, vx1, vy0, vy1;
  plgvpd(&vx0, &vx1, &vy0, &vy1);
  page.add_underlay(fmt::format(
      "<image x=\"{:.2f}\" y=\"{:.2f}\" width=\"{:.2f}\" height=\"{:.2f}\" preserveAspectRatio=\"none\" href=\"{}\"/>\n",
      vx0 * o.width_pt, (1.0 - vy1) * o.height_pt, (vx1 - vx0) * o.width_pt, (vy1 - vy0) * o.height_pt, png_data_uri(w, h, rgb)));
}

// A map with values at pixel centres (nx*ny, x fastest, y upwards; log10, NaN where undefined)
// over [x0, x1] x [y0, y1], coloured on [lo, hi], with a contour at `contour` (log10).
void draw_log_map(Page& page, const FigureOptions& o, const std::vector<double>& values, int nx, int ny, double x0, double x1,
                  double y0, double y1, double lo, double hi, double contour, const std::string& xlabel,
                  const std::string& ylabel) {
  plvpas(0.13, 0.76, 0.14, 0.90, (y1 - y0) / (x1 - x0));
  plwind(x0, x1, y0, y1);
  std::vector<unsigned char> rgb(static_cast<std::size_t>(nx) * ny * 3);
  std::vector<PLFLT> storage(static_cast<std::size_t>(nx) * ny);
  std::vector<PLFLT*> rows(nx);
  for (int i = 0; i < nx; ++i) rows[i] = storage.data() + static_cast<std::size_t>(i) * ny;
  for (int j = 0; j < ny; ++j)
    for (int i = 0; i < nx; ++i) {
      const double v = values[static_cast<std::size_t>(j) * nx + i];
      rows[i][j] = std::isfinite(v) ? v : hi;
      const auto c = std::isfinite(v) ? map_colour((v - lo) / (hi - lo)) : std::array<unsigned char, 3>{200, 200, 200};
      std::copy(c.begin(), c.end(), rgb.begin() + 3 * (static_cast<std::ptrdiff_t>(ny - 1 - j) * nx + i));
    }
  image_in_viewport(page, o, nx, ny, rgb);
  if (std::isfinite(contour) && contour > lo && contour < hi) {
    std::vector<PLFLT> xg(nx), yg(ny);
    for (int i = 0; i < nx; ++i) xg[i] = x0 + (x1 - x0) * (i + 0.5) / nx;
    for (int j = 0; j < ny; ++j) yg[j] = y0 + (y1 - y0) * (j + 0.5) / ny;
    PLcGrid grid{xg.data(), yg.data(), nullptr, nx, ny, 0};
    PLFLT level[] = {contour};
    plcol0(kPaper);
    plwidth(2.6);
    plcont(rows.data(), nx, ny, 1, nx, 1, ny, level, 1, pltr1, &grid);
    plcol0(kInk);
    plwidth(1.2);
    plcont(rows.data(), nx, ny, 1, nx, 1, ny, level, 1, pltr1, &grid);
    plwidth(0.8);
  }
  plcol0(kInk);
  plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
  pllab(xlabel.c_str(), ylabel.c_str(), "");
}

void draw_log_colour_bar(Page& page, const FigureOptions& o, double lo, double hi, const std::string& label) {
  PLFLT vx0, vx1, vy0, vy1;
  plgvpd(&vx0, &vx1, &vy0, &vy1);
  plvpor(0.80, 0.84, vy0, vy1);
  plwind(0.0, 1.0, lo, hi);
  constexpr int kN = 128;
  std::vector<unsigned char> rgb;
  for (int j = kN - 1; j >= 0; --j) {
    const auto c = map_colour((j + 0.5) / kN);
    rgb.insert(rgb.end(), c.begin(), c.end());
  }
  image_in_viewport(page, o, 1, kN, rgb);
  plcol0(kInk);
  plslabelfunc(log_label, nullptr);
  plbox("bc", 0.0, 0, "bcmstvo", 1.0, 1);
  plslabelfunc(nullptr, nullptr);
  plmtex("r", 4.6, 0.5, 0.5, label.c_str());
}

// The lattice of pixel centres covering [-half_h, half_h] x [-half_v, half_v] about `centre`.
MapLattice pixel_lattice(const Vec3& centre, const Vec3& h, const Vec3& v, double half_h, double half_v, int n) {
  const double shrink = static_cast<double>(n - 1) / n;
  return plane_lattice(centre, h, v, 2 * half_h * shrink, 2 * half_v * shrink, n, n);
}

// Deviation (relative) on one plane through the target centre spanned by h (horizontal) and
// v (vertical).
Figure deviation_map(const Model& design, const Vec3& h, const Vec3& v, double half_h, double half_v, const std::string& name,
                     const std::string& caption, const FigureOptions& o) {
  const Target& t = *design.target;
  const FieldMap map = compute_field_map(design, pixel_lattice(t.centre_m, h, v, half_h, half_v, o.map_points));
  const Scale ds = deviation_scale(map.tolerance_relative);
  double lo_data = std::numeric_limits<double>::infinity();
  for (double d : map.deviation)
    if (std::isfinite(d) && d > 0) lo_data = std::min(lo_data, d);
  const double tol = map.tolerance_relative > 0 ? map.tolerance_relative : 1e-4;
  const double hi = std::log10(tol * ds.factor) + 1.5;
  double lo = std::isfinite(lo_data) ? std::floor(std::log10(lo_data * ds.factor)) : hi - 4.0;
  lo = std::clamp(lo, hi - 5.0, hi - 2.0);
  std::vector<double> values(map.deviation.size());
  for (std::size_t i = 0; i < values.size(); ++i) {
    const double d = map.deviation[i];
    values[i] = std::isfinite(d) && d > 0 ? std::clamp(std::log10(d * ds.factor), lo, hi) : (std::isfinite(d) ? lo : d);
  }
  Figure f{name, caption, {}};
  Page page(o);
  const std::string hl = axis_name(h, "u"), vl = axis_name(v, "v");
  draw_log_map(page, o, values, o.map_points, o.map_points, -1e3 * half_h, 1e3 * half_h, -1e3 * half_v, 1e3 * half_v, lo, hi,
               std::log10(tol * ds.factor), fmt::format("{} [mm]", hl), fmt::format("{} [mm]", vl));
  plcol0(kRed);
  plwidth(1.4);
  pllsty(2);
  draw_projected(target_outline(t, h, v), t.centre_m, h, v);
  if (t.region == RegionKind::points) draw_points_region(t, t.centre_m, h, v);
  pllsty(1);
  plwidth(0.8);
  plcol0(kInk);
  plmtex("t", 1.0, 0.0, 0.0, "contour: tolerance; dashed: region");
  draw_log_colour_bar(page, o, lo, hi, fmt::format("deviation [{}]", ds.label));
  f.svg = page.finish();
  return f;
}

}  // namespace
}  // namespace detail

using namespace detail;

Figure axial_profile_figure(const Model& design, const FigureOptions& o) {
  o.validate();
  const Profile p = axial_profile(design, 1.6, o.profile_points);
  const Target& t = *design.target;
  const Vec3 a = t.axis.normalized();
  const Vec3 dir = p.goal.goal == Goal::uniform ? p.goal.field_T.normalized() : a;
  // Top panel: the component along the goal direction (|B| for a null goal).
  std::vector<double> s_mm, b, dev;
  double bmax = 0.0;
  for (std::size_t i = 0; i < p.s_m.size(); ++i) {
    s_mm.push_back(1e3 * p.s_m[i]);
    const double bi = p.goal.goal == Goal::null ? p.field_T[i].norm() : p.field_T[i].dot(dir);
    b.push_back(bi);
    if (std::isfinite(bi)) bmax = std::max(bmax, std::abs(bi));
  }
  const Scale fs = field_scale(bmax);
  for (double& x : b) x *= fs.factor;
  const double tol = p.goal.tolerance_T / p.goal.reference_T;
  const Scale ds = deviation_scale(tol);
  for (double d : p.signed_relative) dev.push_back(d * ds.factor);
  const double h_mm = 1e3 * p.half_extent_m;
  const double x0 = s_mm.front(), x1 = s_mm.back();
  const std::string comp = p.goal.goal == Goal::null ? std::string("|B|") : "B#d" + axis_name(dir, "goal") + "#u";

  Figure f{"profile", "Field along the target axis (top) and its deviation from the goal (bottom); shaded: the tolerance band; "
                      "dashed: the target region's extent.", {}};
  Page page(o);
  // Top: field.
  plvpor(0.16, 0.95, 0.56, 0.93);
  auto [blo, bhi] = finite_range(b);
  plwind(x0, x1, blo, bhi);
  plcol0(kGrey);
  pllsty(2);
  vertical_line(-h_mm, blo, bhi);
  vertical_line(h_mm, blo, bhi);
  pllsty(1);
  plcol0(kInk);
  plbox("bcst", 0.0, 0, "bcnstv", 0.0, 0);
  plmtex("l", 4.2, 0.5, 0.5, fmt::format("{} [{}]", comp, fs.label).c_str());
  plcol0(kBlue);
  plwidth(1.4);
  line_with_gaps(s_mm, b);
  plwidth(0.8);
  // Bottom: deviation, y range from the inside of the region and the tolerance.
  plvpor(0.16, 0.95, 0.14, 0.51);
  double inside = 0.0;
  for (std::size_t i = 0; i < dev.size(); ++i)
    if (std::abs(p.s_m[i]) <= p.half_extent_m * 1.0001 && std::isfinite(dev[i])) inside = std::max(inside, std::abs(dev[i]));
  const double tol_d = tol * ds.factor;
  double ylim = std::max(2.0 * tol_d, 1.3 * inside);
  if (p.goal.goal == Goal::null) {
    plwind(x0, x1, 0.0, ylim);
    shade_band(x0, x1, 0.0, tol_d, kBand);
  } else {
    plwind(x0, x1, -ylim, ylim);
    shade_band(x0, x1, -tol_d, tol_d, kBand);
  }
  plcol0(kGrey);
  pllsty(2);
  vertical_line(-h_mm, -ylim, ylim);
  vertical_line(h_mm, -ylim, ylim);
  pllsty(1);
  plcol0(kInk);
  plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
  plcol0(kRed);
  plwidth(1.4);
  line_with_gaps(s_mm, dev);
  plwidth(0.8);
  plcol0(kInk);
  plmtex("l", 4.2, 0.5, 0.5, fmt::format("deviation [{}]", ds.label).c_str());
  plmtex("b", 2.6, 0.5, 0.5, fmt::format("position along the target axis ({}) [mm]", axis_name(a, "axis")).c_str());
  f.svg = page.finish();
  return f;
}

std::vector<Figure> deviation_map_figures(const Model& design, const FigureOptions& o) {
  o.validate();
  if (!design.target) throw InputError("figures: the design has no [target]; the maps need one");
  const Target& t = *design.target;
  const Frame fr = target_frame(t);
  const double ha = 1.3 * axial_extent(t), hr = 1.3 * radial_extent(t);
  std::vector<Figure> out;
  out.push_back(deviation_map(design, fr.w, fr.u, ha, hr, "map-axial",
                              "Relative deviation on the plane through the target centre containing its axis (log scale).", o));
  out.push_back(deviation_map(design, fr.u, fr.v, hr, hr, "map-transverse",
                              "Relative deviation on the plane through the target centre normal to its axis (log scale).", o));
  return out;
}

Figure layout_figure(const Model& design, const FigureOptions& o) {
  o.validate();
  Frame fr = Frame::from_axis(Vec3::UnitZ(), Vec3::UnitX());
  Vec3 origin = Vec3::Zero();
  if (design.target) {
    fr = target_frame(*design.target);
    origin = design.target->centre_m;
  }
  // Everything drawn, to find a common scale.
  struct Drawn {
    std::vector<Polyline> lines;
    PLINT colour;
  };
  std::vector<Drawn> coils;
  for (const Coil& c : design.coils) {
    std::size_t circuit = 0;
    for (std::size_t k = 0; k < design.circuits.size(); ++k)
      if (design.circuits[k].name == c.circuit) circuit = k;
    Drawn d{{}, kLineColours[circuit % std::size(kLineColours)]};
    for (const Winding& w : windings(c))
      for (auto& l : winding_outline(c, w.centre_m)) d.lines.push_back(std::move(l));
    coils.push_back(std::move(d));
  }
  double extent = 1e-3;
  for (const Drawn& d : coils)
    for (const Polyline& l : d.lines)
      for (const Vec3& p : l) extent = std::max(extent, (p - origin).cwiseAbs().maxCoeff());
  if (design.target) extent = std::max(extent, 1.05 * std::max(axial_extent(*design.target), radial_extent(*design.target)));
  const double e = 1.08e3 * extent;

  Figure f{"layout", "The windings to scale in a side view (target axis horizontal) and an end view; one colour per circuit; "
                     "dashed: the target region.", {}};
  Page page(o);
  struct View {
    Vec3 h, v;
    double x0;
    const char* title;
  };
  const View views[] = {{fr.w, fr.u, 0.14, "side view"}, {fr.u, fr.v, 0.63, "end view"}};
  for (const View& view : views) {
    plvpas(view.x0, view.x0 + 0.34, 0.16, 0.88, 1.0);
    plwind(-e, e, -e, e);
    plcol0(kInk);
    plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
    pllab(fmt::format("{} [mm]", axis_name(view.h, "u")).c_str(), fmt::format("{} [mm]", axis_name(view.v, "v")).c_str(), view.title);
    plwidth(1.0);
    for (const Drawn& d : coils) {
      plcol0(d.colour);
      draw_projected(d.lines, origin, view.h, view.v);
    }
    if (design.target) {
      plcol0(kRed);
      pllsty(2);
      plwidth(1.2);
      draw_projected(target_outline(*design.target, view.h, view.v), origin, view.h, view.v);
      if (design.target->region == RegionKind::points) draw_points_region(*design.target, origin, view.h, view.v);
      pllsty(1);
    }
    plwidth(0.8);
  }
  // Circuit key.
  plvpor(0.0, 1.0, 0.0, 1.0);
  plwind(0.0, 1.0, 0.0, 1.0);
  double x = 0.10;
  for (std::size_t k = 0; k < design.circuits.size() && k < 6; ++k) {
    plcol0(kLineColours[k % std::size(kLineColours)]);
    PLFLT xs[] = {x, x + 0.04}, ys[] = {0.035, 0.035};
    plwidth(2.0);
    plline(2, xs, ys);
    plwidth(0.8);
    plptex(x + 0.05, 0.025, 1.0, 0.0, 0.0, fmt::format("circuit {}", k + 1).c_str());
    x += 0.22;
  }
  f.svg = page.finish();
  return f;
}

Figure profile_comparison_figure(const std::vector<Model>& designs, const FigureOptions& o) {
  o.validate();
  if (designs.empty()) throw InputError("figures: no designs to compare");
  const std::size_t n = std::min<std::size_t>(designs.size(), std::size(kLineColours));
  std::vector<Profile> profiles;
  for (std::size_t i = 0; i < n; ++i) profiles.push_back(axial_profile(designs[i], 1.25, o.profile_points));
  const double tol = profiles[0].goal.tolerance_T / profiles[0].goal.reference_T;
  const Scale ds = deviation_scale(tol);
  double inside = 0.0;
  for (const Profile& p : profiles)
    for (std::size_t i = 0; i < p.s_m.size(); ++i)
      if (std::abs(p.s_m[i]) <= p.half_extent_m * 1.0001 && std::isfinite(p.signed_relative[i]))
        inside = std::max(inside, std::abs(p.signed_relative[i]) * ds.factor);
  const double tol_d = tol * ds.factor;
  const double ylim = std::max(2.0 * tol_d, 1.3 * inside);
  const bool null_goal = profiles[0].goal.goal == Goal::null;
  const double x0 = 1e3 * profiles[0].s_m.front(), x1 = 1e3 * profiles[0].s_m.back();
  const double h_mm = 1e3 * profiles[0].half_extent_m;

  Figure f{"compare", "Deviation along the target axis of the ranked designs; shaded: the tolerance band; dashed grey: the "
                      "target region's extent.", {}};
  Page page(o);
  plvpor(0.16, 0.95, 0.15, 0.80);
  plwind(x0, x1, null_goal ? 0.0 : -ylim, ylim);
  shade_band(x0, x1, null_goal ? 0.0 : -tol_d, tol_d, kBand);
  plcol0(kGrey);
  pllsty(2);
  vertical_line(-h_mm, -ylim, ylim);
  vertical_line(h_mm, -ylim, ylim);
  pllsty(1);
  plcol0(kInk);
  plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
  pllab(fmt::format("position along the target axis ({}) [mm]", axis_name(designs[0].target->axis.normalized(), "axis")).c_str(),
        fmt::format("deviation [{}]", ds.label).c_str(), "");
  for (std::size_t k = 0; k < n; ++k) {
    std::vector<double> s, d;
    for (std::size_t i = 0; i < profiles[k].s_m.size(); ++i) {
      s.push_back(1e3 * profiles[k].s_m[i]);
      d.push_back(profiles[k].signed_relative[i] * ds.factor);
    }
    plcol0(kLineColours[k]);
    pllsty(kLineStyles[k]);
    plwidth(1.4);
    line_with_gaps(s, d);
  }
  pllsty(1);
  plwidth(0.8);
  // Key above the plot.
  plvpor(0.16, 0.95, 0.82, 0.98);
  plwind(0.0, 1.0, 0.0, 1.0);
  for (std::size_t k = 0; k < n; ++k) {
    const double x = 0.02 + (k % 3) * 0.34, y = k < 3 ? 0.70 : 0.25;
    plcol0(kLineColours[k]);
    pllsty(kLineStyles[k]);
    plwidth(1.4);
    PLFLT xs[] = {x, x + 0.09}, ys[] = {y, y};
    plline(2, xs, ys);
    pllsty(1);
    plwidth(0.8);
    plcol0(kInk);
    plptex(x + 0.11, y - 0.08, 1.0, 0.0, 0.0, fmt::format("rank {}", k + 1).c_str());
  }
  f.svg = page.finish();
  return f;
}

Figure residual_map_figure(const Model& nulled, const AmbientField& ambient, const Vec3& ambient_centre_m, double tolerance_T,
                           const FigureOptions& o) {
  o.validate();
  if (!nulled.target) throw InputError("figures: the model has no [target]; the residual map needs its region");
  const Target& t = *nulled.target;
  const Frame fr = target_frame(t);
  const double ha = 1.3 * axial_extent(t), hr = 1.3 * radial_extent(t);
  Model coils_only = nulled;
  coils_only.target.reset();
  const MapLattice lattice = pixel_lattice(t.centre_m, fr.w, fr.u, ha, hr, o.map_points);
  const FieldMap map = compute_field_map(coils_only, lattice);
  std::vector<double> residual(map.points.size());
  double lo_data = std::numeric_limits<double>::infinity();
  for (std::size_t i = 0; i < residual.size(); ++i) {
    const Vec3 r = map.field_T[i] + ambient.at(map.points[i], ambient_centre_m);
    residual[i] = r.allFinite() ? r.norm() * 1e9 : std::numeric_limits<double>::quiet_NaN();  // nT
    if (std::isfinite(residual[i]) && residual[i] > 0) lo_data = std::min(lo_data, residual[i]);
  }
  const double tol_nT = tolerance_T > 0 ? tolerance_T * 1e9 : 10.0;
  const double hi = std::log10(tol_nT) + 1.5;
  double lo = std::isfinite(lo_data) ? std::floor(std::log10(lo_data)) : hi - 4.0;
  lo = std::clamp(lo, hi - 5.0, hi - 2.0);
  for (double& v : residual) v = std::isfinite(v) && v > 0 ? std::clamp(std::log10(v), lo, hi) : (std::isfinite(v) ? lo : v);
  Figure f{"residual", "Residual field |B_coils + B_ambient| after nulling on the plane through the target containing its axis "
                       "(log scale); contour: the tolerance; dashed: the region.", {}};
  Page page(o);
  draw_log_map(page, o, residual, o.map_points, o.map_points, -1e3 * ha, 1e3 * ha, -1e3 * hr, 1e3 * hr, lo, hi, std::log10(tol_nT),
               fmt::format("{} [mm]", axis_name(fr.w, "u")), fmt::format("{} [mm]", axis_name(fr.u, "v")));
  plcol0(kRed);
  plwidth(1.4);
  pllsty(2);
  draw_projected(target_outline(t, fr.w, fr.u), t.centre_m, fr.w, fr.u);
  pllsty(1);
  plwidth(0.8);
  draw_log_colour_bar(page, o, lo, hi, "residual [nT]");
  f.svg = page.finish();
  return f;
}

Figure worst_deviation_histogram(const std::vector<double>& worst_relative, double tolerance_relative, const FigureOptions& o) {
  o.validate();
  if (worst_relative.empty()) throw InputError("figures: the tolerance study has no samples");
  for (double v : worst_relative)
    if (!std::isfinite(v) || v < 0) throw InputError(fmt::format("figures: worst deviation {} is not a finite value >= 0", v));
  const Scale ds = deviation_scale(tolerance_relative);
  std::vector<double> v;
  for (double x : worst_relative) v.push_back(x * ds.factor);
  const double tol = tolerance_relative * ds.factor;
  double lo = *std::min_element(v.begin(), v.end()), hi = *std::max_element(v.begin(), v.end());
  if (tolerance_relative > 0) {
    lo = std::min(lo, tol);
    hi = std::max(hi, tol);
  }
  if (hi - lo <= 1e-12 * std::max(1.0, std::abs(hi))) {
    lo -= 0.5 * std::max(1e-9, std::abs(lo));
    hi += 0.5 * std::max(1e-9, std::abs(hi));
  }
  lo = std::max(0.0, lo - 0.04 * (hi - lo));
  hi += 0.04 * (hi - lo);
  const int bins = std::clamp(static_cast<int>(std::sqrt(static_cast<double>(v.size()))), 8, 40);
  std::vector<int> count(bins, 0);
  for (double x : v) count[std::min(bins - 1, static_cast<int>((x - lo) / (hi - lo) * bins))]++;
  const int cmax = *std::max_element(count.begin(), count.end());
  std::size_t within = 0;
  for (double x : worst_relative) within += x <= tolerance_relative ? 1 : 0;

  Figure f{"tolerance-histogram", "Distribution of the worst deviation over the perturbed builds; dashed: the tolerance.", {}};
  Page page(o);
  plvpor(0.15, 0.95, 0.15, 0.86);
  plwind(lo, hi, 0.0, 1.1 * cmax);
  for (int b = 0; b < bins; ++b) {
    if (count[b] == 0) continue;
    const double a = lo + (hi - lo) * b / bins, c = lo + (hi - lo) * (b + 1) / bins;
    shade_band(a, c, 0.0, count[b], kBlue);
    plcol0(kInk);
    PLFLT xs[] = {a, a, c, c}, ys[] = {0.0, static_cast<PLFLT>(count[b]), static_cast<PLFLT>(count[b]), 0.0};
    plline(4, xs, ys);
  }
  if (tolerance_relative > 0) {
    plcol0(kRed);
    pllsty(2);
    plwidth(1.4);
    vertical_line(tol, 0.0, 1.1 * cmax);
    pllsty(1);
    plwidth(0.8);
  }
  plcol0(kInk);
  plbox("bcnst", 0.0, 0, "bcnstv", 0.0, 0);
  pllab(fmt::format("worst deviation [{}]", ds.label).c_str(), "builds", "");
  plmtex("t", 0.8, 0.0, 0.0,
         fmt::format("{} builds; {:.1f} % within tolerance", worst_relative.size(), 100.0 * within / worst_relative.size()).c_str());
  f.svg = page.finish();
  return f;
}

std::vector<Figure> design_figures(const Model& design, const FigureOptions& o) {
  std::vector<Figure> out;
  if (design.target) {
    out.push_back(axial_profile_figure(design, o));
    for (Figure& f : deviation_map_figures(design, o)) out.push_back(std::move(f));
  }
  out.push_back(layout_figure(design, o));
  return out;
}

std::string inline_svg(const std::string& svg) {
  const std::size_t at = svg.find("<svg");
  return at == std::string::npos ? svg : svg.substr(at);
}

}  // namespace coilwright
