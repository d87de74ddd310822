#version 330 core
// The backdrop (background colour with the populations' dots, composited on the CPU;
// premultiplied RGBA, top row first), copied into a framebuffer that cannot be written
// directly (the window's). Drawn with blending off.
uniform sampler2D u_image;
uniform float u_y_sign;       // as in the other stages: -1 when the frame is read top first
uniform vec2 u_size_px;
uniform vec2 u_origin_px;     // where the frame's viewport starts in the framebuffer

out vec4 frag_color;

void main() {
    ivec2 p = ivec2(gl_FragCoord.xy - u_origin_px);
    if (u_y_sign > 0.0) p.y = int(u_size_px.y) - 1 - p.y;
    frag_color = texelFetch(u_image, p, 0);
}
