#version 330 core
// Glyph coverage (red channel) over a dark halo (green channel), so labels stay readable
// over lines and fills. Drawn in two layers, every halo of a batch first (u_layer 0), then
// every glyph's ink (u_layer 1), so that a glyph's halo never darkens its neighbour's ink.
// Premultiplied alpha.
uniform sampler2D u_atlas;
uniform vec4 u_halo;
uniform int u_layer;

in vec2 v_uv;
flat in vec4 v_color;

out vec4 frag_color;

void main() {
    vec2 g = texture(u_atlas, v_uv).rg;
    float a = u_layer == 0 ? g.g * u_halo.a : g.r * v_color.a;
    if (a <= 0.0) discard;
    vec3 rgb = u_layer == 0 ? u_halo.rgb : v_color.rgb;
    frag_color = vec4(rgb * a, a);
}
