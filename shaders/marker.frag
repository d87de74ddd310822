#version 330 core
// Each marker shape from its distance function, anti-aliased over one pixel.
// Shapes (viewer.geometry.frame): 0 disc with a dark rim of width param, 1 ring of width
// param, 2 diamond, 3 glow (param = core radius), 4 sphere (param = limb darkening),
// 5 crosshair (ring and cross, line width param), 6 arrow head pointing along +x.
in vec2 v_local;
flat in float v_radius;
flat in int v_shape;
flat in float v_param;
flat in vec4 v_color;

out vec4 frag_color;

float cover(float signed_dist) { return clamp(0.5 - signed_dist, 0.0, 1.0); }

void main() {
    float r = length(v_local);
    float R = v_radius;
    vec3 rgb = v_color.rgb;
    float c = 0.0;
    if (v_shape == 0) {
        c = cover(r - R);
        float rim = clamp(0.5 + (R - v_param) - r, 0.0, 1.0);
        rgb = mix(vec3(0.02, 0.03, 0.05), rgb, rim);
    } else if (v_shape == 1) {
        c = cover(abs(r - (R - 0.5 * v_param)) - 0.5 * v_param);
    } else if (v_shape == 2) {
        c = cover((abs(v_local.x) + abs(v_local.y) - R) * 0.70710678);
    } else if (v_shape == 3) {
        float t = clamp((r - v_param) / max(R - v_param, 1e-3), 0.0, 1.0);
        c = pow(1.0 - t, 2.0) * (0.25 + 0.75 * exp(-7.0 * t));
    } else if (v_shape == 4) {
        c = cover(r - R);
        float mu = sqrt(max(0.0, 1.0 - (r * r) / (R * R)));
        rgb = mix(rgb, vec3(1.0), 0.45 * mu * v_param) * (1.0 - v_param * (1.0 - mu));
    } else if (v_shape == 5) {
        float ring = cover(abs(r - (R - 0.5 * v_param)) - 0.5 * v_param);
        float arm = 0.45 * R;
        float bx = cover(abs(v_local.y) - 0.5 * v_param) * cover(abs(v_local.x) - arm);
        float by = cover(abs(v_local.x) - 0.5 * v_param) * cover(abs(v_local.y) - arm);
        c = max(ring, max(bx, by));
    } else {
        vec2 tip = vec2(R, 0.0);
        vec2 n_up = normalize(vec2(0.75, 2.0));
        vec2 n_dn = normalize(vec2(0.75, -2.0));
        float d = max(-R - v_local.x, max(dot(v_local - tip, n_up), dot(v_local - tip, n_dn)));
        c = cover(d);
    }
    float a = v_color.a * c;
    if (a <= 0.0) discard;
    frag_color = vec4(rgb * a, a);
}
