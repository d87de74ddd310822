#version 330 core
// Markers (discs, rings, diamonds, glows, the central sphere, focus crosshairs, arrow
// heads): one instance per marker, a quad around its centre, rotated by its angle.
uniform vec2 u_size_px;
uniform float u_y_sign;    // +1 for a window, -1 for an offscreen frame read top row first

in vec2 in_corner;          // per vertex: (-1, -1) .. (1, 1)
in vec2 in_center_px;       // per instance
in float in_radius_px;
in float in_shape;
in float in_param;
in float in_angle;
in vec4 in_color;

out vec2 v_local;           // px from the centre, in the marker's own frame
flat out float v_radius;
flat out int v_shape;
flat out float v_param;
flat out vec4 v_color;

void main() {
    float extent = in_radius_px + 1.5;
    vec2 u = vec2(cos(in_angle), sin(in_angle));
    vec2 w = vec2(-u.y, u.x);
    vec2 local = in_corner * extent;
    vec2 p = in_center_px + local.x * u + local.y * w;
    vec2 ndc = vec2(2.0 * p.x / u_size_px.x - 1.0, u_y_sign * (1.0 - 2.0 * p.y / u_size_px.y));
    gl_Position = vec4(ndc, 0.0, 1.0);
    v_local = local;
    v_radius = in_radius_px;
    v_shape = int(in_shape + 0.5);
    v_param = in_param;
    v_color = in_color;
}
