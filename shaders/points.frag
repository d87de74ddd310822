#version 330 core
// A round, anti-aliased point; a point smaller than a pixel keeps its total light.
flat in float v_size;
flat in vec4 v_color;

out vec4 frag_color;

void main() {
    float s = max(v_size, 1.0);
    float r = length(gl_PointCoord - vec2(0.5)) * (s + 1.0);
    float c = clamp(0.5 * s + 0.5 - r, 0.0, 1.0) * min(v_size * v_size, 1.0);
    float a = v_color.a * c;
    if (a <= 0.0) discard;
    frag_color = vec4(v_color.rgb * a, a);
}
