#version 330 core
// The editor's panels: imgui's vertices (pixel positions, atlas UV, 8-bit RGBA colour).
uniform vec2 u_display_px;

in vec2 in_pos_px;
in vec2 in_uv;
in vec4 in_color;

out vec2 v_uv;
out vec4 v_color;

void main() {
    v_uv = in_uv;
    v_color = in_color;
    vec2 ndc = vec2(2.0 * in_pos_px.x / u_display_px.x - 1.0,
                    1.0 - 2.0 * in_pos_px.y / u_display_px.y);
    gl_Position = vec4(ndc, 0.0, 1.0);
}
