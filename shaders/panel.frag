#version 330 core
// Panel colour times the font/texture atlas, straight alpha (blended SRC_ALPHA, 1-SRC_ALPHA).
uniform sampler2D u_texture;

in vec2 v_uv;
in vec4 v_color;

out vec4 frag_color;

void main() {
    frag_color = v_color * texture(u_texture, v_uv);
}
