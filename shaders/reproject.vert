#version 330 core
// One triangle that covers the whole output image; the fragment shader does the work.
out vec2 v_unused;

void main() {
    vec2 p = vec2(float((gl_VertexID << 1) & 2), float(gl_VertexID & 2));
    v_unused = p;
    gl_Position = vec4(p * 2.0 - 1.0, 0.0, 1.0);
}
