#version 330 core
// Cube faces -> dome master (square angular fisheye) or 2:1 equirectangular panorama.
// The same definitions as viewer/export/projection.py (tested there against the formats),
// in the camera basis (r image right, u image up, f eye toward target), whose axes the
// six faces look along (see sky below). Each output pixel averages an n x n grid of
// sub-pixel samples (supersampling), each bilinear from the face that sees it.
// With RECORD_LUT (and GRID 1) it writes each pixel's atlas point instead, into a
// two-channel float target that reproject_lut.frag then reads (the same bits, less work).
uniform int u_mode;            // 0 dome, 1 panorama
uniform vec2 u_out_size;       // output pixels (W, H)
uniform float u_half_fov;      // dome: FOV / 2, radians
uniform vec2 u_tilt_cs;        // dome: (cos, sin) of the tilt toward the front
// GRID: n, n*n samples per output pixel, a compile-time constant (the loops unroll:
// llvmpipe runs a loop with a uniform bound about three times slower).
// With UNIFORM_GRID the bound is the uniform u_grid instead (the earlier path, kept as
// the baseline of `perifocal bench export`).
#ifdef UNIFORM_GRID
uniform int u_grid;
#define GRID u_grid
#endif
#ifndef GRID
#define GRID 2
#endif
uniform vec4 u_outside;        // colour outside the dome's circle (premultiplied)
uniform sampler2D u_atlas;     // the six faces side by side, 3 across and 2 down
uniform float u_face_px;       // one face's size in texels
uniform vec2 u_origin;         // where the output starts in the framebuffer (px)
uniform bool u_rows_up;        // rows counted from the bottom (a window's screen)

out vec4 f_color;

// Where in the atlas a face's plane point is: one fetch there (a branch per face would
// cost llvmpipe a fetch per face). uv is kept half a texel inside the face so bilinear
// never reads its neighbour.
vec2 atlas_at(vec2 tile, vec2 uv) {
    vec2 inner = clamp(uv, 0.5 / u_face_px, 1.0 - 0.5 / u_face_px);
    return (tile + inner) / vec2(3.0, 2.0);
}

// c: direction in the camera basis. The faces are the basis axes (CUBE_FACES in
// viewer/export/projection.py; a face's right is -(forward x up) in this left-handed
// basis), so the face is the component of largest size, and its plane coordinates are
// two components over it with the signs of its right and up vectors: written out per
// face, with its tile in the atlas, llvmpipe runs this a quarter faster than dot
// products with vectors picked from uniform arrays (the same bits: those vectors are
// the axes to within 1e-16).
vec2 sky(vec3 c) {
    vec3 a = abs(c);
    vec2 tile;
    float most;
    vec2 plane;
    if (a.z >= a.x && a.z >= a.y) {
        if (c.z > 0.0) { tile = vec2(0.0, 0.0); most = c.z; plane = vec2(c.x, c.y); }
        else { tile = vec2(1.0, 0.0); most = -c.z; plane = vec2(-c.x, c.y); }
    } else if (a.x >= a.y) {
        if (c.x > 0.0) { tile = vec2(2.0, 0.0); most = c.x; plane = vec2(-c.z, c.y); }
        else { tile = vec2(0.0, 1.0); most = -c.x; plane = vec2(c.z, c.y); }
    } else {
        if (c.y > 0.0) { tile = vec2(1.0, 1.0); most = c.y; plane = vec2(c.x, -c.z); }
        else { tile = vec2(2.0, 1.0); most = -c.y; plane = vec2(c.x, c.z); }
    }
    return atlas_at(tile, (plane / most) * 0.5 + 0.5);
}

// The atlas point seen at xy (x right, y up, both in (-1, 1) over the output image).
vec2 atlas_point(vec2 xy, out bool inside) {
    inside = true;
    vec3 c;  // direction in the camera basis (r, u, f)
    if (u_mode == 0) {
        float rho = length(xy);
        if (rho > 1.0) { inside = false; return vec2(0.0); }
        float theta = rho * u_half_fov;
        // (sin(theta) cos(phi), sin(theta) sin(phi)) without the angle phi itself.
        vec2 radial = rho > 0.0 ? xy * (sin(theta) / rho) : vec2(0.0);
        c = vec3(radial, cos(theta));
        c = vec3(c.x, c.y * u_tilt_cs.x - c.z * u_tilt_cs.y, c.y * u_tilt_cs.y + c.z * u_tilt_cs.x);
    } else {
        float lon = xy.x * 3.14159265358979;
        float lat = xy.y * 1.57079632679490;
        c = vec3(cos(lat) * sin(lon), sin(lat), cos(lat) * cos(lon));
    }
    return sky(c);
}

void main() {
    // gl_FragCoord.y counts from the first row in memory, which is the image's top row
    // (on a screen, from the bottom row: u_rows_up turns it into the same image row).
    vec2 frag = gl_FragCoord.xy - u_origin;
    if (u_rows_up) frag.y = u_out_size.y - frag.y;
    vec4 sum = vec4(0.0);
    float n = float(GRID);
    for (int i = 0; i < GRID; ++i) {
        for (int j = 0; j < GRID; ++j) {
            vec2 px = floor(frag) + (vec2(float(i), float(j)) + 0.5) / n;
            vec2 xy = vec2(2.0 * px.x / u_out_size.x - 1.0, 1.0 - 2.0 * px.y / u_out_size.y);
            bool inside;
            vec2 at = atlas_point(xy, inside);
#ifdef RECORD_LUT
            // The atlas point itself, for reproject_lut.frag (GRID 1): -1 off the output.
            sum = vec4(inside ? at : vec2(-1.0), 0.0, 0.0);
#else
            vec4 s = u_outside;
            if (inside) s = textureLod(u_atlas, at, 0.0);
            sum += s;
#endif
        }
    }
    f_color = sum / (n * n);
}
