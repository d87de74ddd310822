#version 330 core
// The area the fragment shader works on. With u_fan_sides 0: one triangle that covers
// the whole output image. With u_fan_sides n > 0 (dome masters): a fan of n triangles,
// a regular n-gon about the image's centre of circumradius u_fan_radius (in the output's
// normalised coordinates, -1..1 across), drawn over a clear to the outside colour, so
// the corners outside the dome's circle cost no shading.
uniform int u_fan_sides;
uniform float u_fan_radius;
out vec2 v_unused;

const float TAU = 6.28318530717959;

void main() {
    if (u_fan_sides > 0) {
        int corner = gl_VertexID % 3;
        float k = float(gl_VertexID / 3 + (corner == 2 ? 1 : 0));
        float a = TAU * k / float(u_fan_sides);
        vec2 p = corner == 0 ? vec2(0.0) : u_fan_radius * vec2(cos(a), sin(a));
        v_unused = p;
        gl_Position = vec4(p, 0.0, 1.0);
        return;
    }
    vec2 p = vec2(float((gl_VertexID << 1) & 2), float(gl_VertexID & 2));
    v_unused = p;
    gl_Position = vec4(p * 2.0 - 1.0, 0.0, 1.0);
}
