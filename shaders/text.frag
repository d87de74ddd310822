#version 330 core
// Glyph coverage (red channel) over a dark halo (green channel), so labels stay readable
// over lines and fills. Premultiplied alpha.
uniform sampler2D u_atlas;
uniform vec4 u_halo;

in vec2 v_uv;
flat in vec4 v_color;

out vec4 frag_color;

void main() {
    vec2 g = texture(u_atlas, v_uv).rg;
    float at = g.r * v_color.a;
    float ah = g.g * u_halo.a;
    vec3 rgb = v_color.rgb * at + u_halo.rgb * ah * (1.0 - at);
    float a = at + ah * (1.0 - at);
    if (a <= 0.0) discard;
    frag_color = vec4(rgb, a);
}
