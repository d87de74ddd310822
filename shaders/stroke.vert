#version 330 core
// Thick lines: the CPU (viewer.geometry.strokes) has already expanded each segment into
// a mitred quad in image pixels; this stage maps pixels (y down) to clip space and passes
// the distances the fragment stage turns into coverage.
uniform vec2 u_size_px;
uniform float u_y_sign;    // +1 for a window, -1 for an offscreen frame read top row first

in vec2 in_pos_px;
in float in_across;
in float in_along;
in vec2 in_caps;
in float in_half_width;
in vec2 in_dash;
in vec4 in_color;

out float v_across;
out float v_along;
flat out vec2 v_caps;
flat out float v_half_width;
flat out vec2 v_dash;
flat out vec4 v_color;

void main() {
    vec2 ndc = vec2(2.0 * in_pos_px.x / u_size_px.x - 1.0, u_y_sign * (1.0 - 2.0 * in_pos_px.y / u_size_px.y));
    gl_Position = vec4(ndc, 0.0, 1.0);
    v_across = in_across;
    v_along = in_along;
    v_caps = in_caps;
    v_half_width = in_half_width;
    v_dash = in_dash;
    v_color = in_color;
}
