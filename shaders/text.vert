#version 330 core
// Label glyphs: quads in image pixels textured from the glyph atlas.
uniform vec2 u_size_px;
uniform float u_y_sign;    // +1 for a window, -1 for an offscreen frame read top row first

in vec2 in_pos_px;
in vec2 in_uv;
in vec4 in_color;

out vec2 v_uv;
flat out vec4 v_color;

void main() {
    vec2 ndc = vec2(2.0 * in_pos_px.x / u_size_px.x - 1.0, u_y_sign * (1.0 - 2.0 * in_pos_px.y / u_size_px.y));
    gl_Position = vec4(ndc, 0.0, 1.0);
    v_uv = in_uv;
    v_color = in_color;
}
