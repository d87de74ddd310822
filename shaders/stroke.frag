#version 330 core
// Coverage of a one-pixel box filter over the line: across the line, at butt caps and
// at dash ends. Output is premultiplied alpha.
in float v_across;
in float v_along;
flat in vec2 v_caps;
flat in float v_half_width;
flat in vec2 v_dash;
flat in vec4 v_color;

out vec4 frag_color;

void main() {
    float c = clamp(v_half_width + 0.5 - abs(v_across), 0.0, 1.0);
    c *= clamp(0.5 + v_along - v_caps.x, 0.0, 1.0) * clamp(0.5 + v_caps.y - v_along, 0.0, 1.0);
    if (v_dash.x > 0.0) {
        float period = v_dash.x + v_dash.y;
        float s = mod(v_along, period);
        float d = s < v_dash.x ? min(s, v_dash.x - s) : -min(s - v_dash.x, period - s);
        c *= clamp(0.5 + d, 0.0, 1.0);
    }
    float a = v_color.a * c;
    if (a <= 0.0) discard;
    frag_color = vec4(v_color.rgb * a, a);
}
