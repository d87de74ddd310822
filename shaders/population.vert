#version 330 core
// Many small bodies, by transform feedback (no rasterisation): each point solves
// Kepler's equation M = E - e sin E (Newton from Danby's starter E0 = M + 0.85 e sign(sin M),
// until a step is below float32 resolution, at most 10; the same inputs always take the
// same steps, so every frame is reproducible), then
// r = (cos E - e) aP + sin E bQ is made relative to the view's target and projected to
// image pixels (y down). The CPU advances and reduces M in float64 each frame and
// splats the pixels into a density image (viewer.geometry.population), which
// density.frag lays over the frame: one draw for any number of points.
uniform vec2 u_size_px;
uniform vec3 u_origin_m;
uniform vec3 u_right;
uniform vec3 u_up;
uniform vec3 u_back;
uniform int u_perspective;
uniform float u_px_per_m;     // orthographic scale
uniform float u_focal_px;     // perspective: px per unit of x / depth
uniform float u_distance_m;   // perspective: eye distance from the target
uniform float u_near_m;

in vec3 in_aP;
in vec3 in_bQ;
in float in_e;
in float in_M;

out vec3 v_px_seen;           // x, y (px), 1 if in front of the eye else 0

void main() {
    float e = in_e;
    float M = in_M;
    float E = M + 0.85 * e * sign(sin(M));
    for (int k = 0; k < 10; ++k) {
        float step = (E - e * sin(E) - M) / (1.0 - e * cos(E));
        E -= step;
        if (abs(step) < 2e-7) break;  // float32 resolution: the result no longer moves
    }
    vec3 rel = (cos(E) - e) * in_aP + sin(E) * in_bQ - u_origin_m;
    vec3 cam = vec3(dot(u_right, rel), dot(u_up, rel), dot(u_back, rel));
    if (u_perspective == 1) {
        float depth = u_distance_m - cam.z;
        float seen = depth > u_near_m ? 1.0 : 0.0;
        vec2 px = 0.5 * u_size_px + vec2(cam.x, -cam.y) * (u_focal_px / max(depth, u_near_m));
        v_px_seen = vec3(px, seen);
    } else {
        v_px_seen = vec3(0.5 * u_size_px + vec2(cam.x, -cam.y) * u_px_per_m, 1.0);
    }
}
