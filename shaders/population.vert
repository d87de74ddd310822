#version 330 core
// Many small bodies: each point solves Kepler's equation M = E - e sin E here (Newton
// from Danby's starter E0 = M + 0.85 e sign(sin M), a fixed number of steps so that
// every frame is reproducible), then r = (cos E - e) aP + sin E bQ, made relative to the
// view's target and projected. The CPU advances and reduces M in float64 each frame
// (viewer.geometry.population). Shares points.frag.
uniform vec2 u_size_px;
uniform float u_y_sign;    // +1 for a window, -1 for an offscreen frame read top row first
uniform vec3 u_origin_m;
uniform vec3 u_right;
uniform vec3 u_up;
uniform vec3 u_back;
uniform int u_perspective;
uniform float u_px_per_m;     // orthographic scale
uniform float u_focal_px;     // perspective: px per unit of x / depth
uniform float u_distance_m;   // perspective: eye distance from the target
uniform float u_near_m;
uniform float u_point_px;
uniform vec4 u_color;

in vec3 in_aP;
in vec3 in_bQ;
in float in_e;
in float in_M;

flat out float v_size;
flat out vec4 v_color;

void main() {
    float e = in_e;
    float M = in_M;
    float E = M + 0.85 * e * sign(sin(M));
    for (int k = 0; k < 6; ++k) {
        E -= (E - e * sin(E) - M) / (1.0 - e * cos(E));
    }
    vec3 rel = (cos(E) - e) * in_aP + sin(E) * in_bQ - u_origin_m;
    vec3 cam = vec3(dot(u_right, rel), dot(u_up, rel), dot(u_back, rel));
    vec2 px;
    if (u_perspective == 1) {
        float depth = u_distance_m - cam.z;
        if (depth <= u_near_m) {
            gl_Position = vec4(0.0, 0.0, 2.0, 1.0);  // outside the clip volume
            v_size = 0.0;
            v_color = vec4(0.0);
            return;
        }
        px = 0.5 * u_size_px + vec2(cam.x, -cam.y) * (u_focal_px / depth);
    } else {
        px = 0.5 * u_size_px + vec2(cam.x, -cam.y) * u_px_per_m;
    }
    vec2 ndc = vec2(2.0 * px.x / u_size_px.x - 1.0, u_y_sign * (1.0 - 2.0 * px.y / u_size_px.y));
    gl_Position = vec4(ndc, 0.0, 1.0);
    gl_PointSize = max(u_point_px, 1.0) + 1.0;
    v_size = u_point_px;
    v_color = u_color;
}
