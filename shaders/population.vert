#version 330 core
// Many small bodies, by transform feedback (no rasterisation), four bodies per vertex:
// the vertex stage's fixed cost (fetch, emit, feedback) is paid once for four, and the
// math of each body is the same, term for term, as for a body on its own. Each body
// solves Kepler's equation M = E - e sin E (Newton from Danby's starter
// E0 = M + 0.85 e sign(sin M), until its step is below float32 resolution, at most 10;
// a body that has stopped keeps its E while the others of its vertex step on, so the
// same inputs always take the same steps and every frame is reproducible), then
// r = (cos E - e) aP + sin E bQ is made relative to the view's target and projected to
// image pixels (y down). The CPU advances and reduces M in float64 each frame and
// splats the pixels into a density image (viewer.geometry.population), which is laid
// under the frame: one pass for any number of points.
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

// Component j of every input belongs to body 4 k + j of vertex k.
in vec4 in_aPx;
in vec4 in_aPy;
in vec4 in_aPz;
in vec4 in_bQx;
in vec4 in_bQy;
in vec4 in_bQz;
in vec4 in_e;
in vec4 in_M;

// x, y (px) of bodies 4 k, 4 k + 1 and of 4 k + 2, 4 k + 3: one (x, y) row per body, in
// the bodies' order. A body behind the eye gets BEHIND_EYE_PX for both, far off the image
// (viewer.geometry.population.BEHIND_EYE_PX): two floats a body, not three, as
// llvmpipe's feedback costs by the float written.
out vec4 v_px01;
out vec4 v_px23;

const float BEHIND_EYE_PX = -1.0e30;

vec2 project(vec3 r) {
    vec3 rel = r - u_origin_m;
    vec3 cam = vec3(dot(u_right, rel), dot(u_up, rel), dot(u_back, rel));
    if (u_perspective == 1) {
        float depth = u_distance_m - cam.z;
        vec2 px = 0.5 * u_size_px + vec2(cam.x, -cam.y) * (u_focal_px / max(depth, u_near_m));
        return depth > u_near_m ? px : vec2(BEHIND_EYE_PX);
    }
    return 0.5 * u_size_px + vec2(cam.x, -cam.y) * u_px_per_m;
}

void main() {
    vec4 e = in_e;
    vec4 M = in_M;
    vec4 E = M + 0.85 * e * sign(sin(M));
    bvec4 moving = bvec4(true);
    for (int k = 0; k < 10; ++k) {
        vec4 step = (E - e * sin(E) - M) / (1.0 - e * cos(E));
        E = mix(E, E - step, moving);
        // float32 resolution: the result no longer moves
        moving = bvec4(uvec4(moving) & uvec4(greaterThanEqual(abs(step), vec4(2e-7))));
        if (!any(moving)) break;
    }
    vec4 c = cos(E) - e;
    vec4 s = sin(E);
    vec4 rx = c * in_aPx + s * in_bQx;
    vec4 ry = c * in_aPy + s * in_bQy;
    vec4 rz = c * in_aPz + s * in_bQz;
    v_px01 = vec4(project(vec3(rx[0], ry[0], rz[0])), project(vec3(rx[1], ry[1], rz[1])));
    v_px23 = vec4(project(vec3(rx[2], ry[2], rz[2])), project(vec3(rx[3], ry[3], rz[3])));
}
