#version 330 core
// Plain triangles in image pixels (sector fans): pixels (y down) to clip space.
uniform vec2 u_size_px;
uniform float u_y_sign;    // +1 for a window, -1 for an offscreen frame read top row first

in vec2 in_pos_px;
in vec4 in_color;

flat out vec4 v_color;

void main() {
    vec2 ndc = vec2(2.0 * in_pos_px.x / u_size_px.x - 1.0, u_y_sign * (1.0 - 2.0 * in_pos_px.y / u_size_px.y));
    gl_Position = vec4(ndc, 0.0, 1.0);
    v_color = in_color;
}
