# The second demo's scene (an invented scenario): a night rooftop. The camera cranes up and pans
# across a roof while a red warning lamp on a radio mast and a sodium street lamp beyond the
# parapet come into view; an antenna pole and a water tank pass in front of the lamps.
# Blender builds it, exports it as shots/scenes/rooftop.glb (camera, lights, animation) and
# renders the depth pass the shot uses as its depth matte (half-size, half-float OpenEXR; oiiotool
# keeps the depth channel alone).
#
# Run from the repository: blender -b --factory-startup --python tools/make-demo-scene.py

import glob
import math
import os
import subprocess

import bpy

OUT = os.path.join(os.getcwd(), 'shots', 'scenes')
FIRST, LAST = 1, 48
os.makedirs(os.path.join(OUT, 'rooftop-depth'), exist_ok=True)

bpy.ops.wm.read_factory_settings(use_empty=True)
scene = bpy.context.scene
scene.render.resolution_x = 480
scene.render.resolution_y = 270
scene.render.resolution_percentage = 100
scene.render.fps = 24
scene.frame_start = FIRST
scene.frame_end = LAST

cam_data = bpy.data.cameras.new('CraneCam')
cam_data.lens = 35.0
cam_data.sensor_width = 36.0
cam_data.sensor_fit = 'HORIZONTAL'
cam_data.clip_start = 0.1
cam_data.clip_end = 2000.0
cam = bpy.data.objects.new('CraneCam', cam_data)
scene.collection.objects.link(cam)
scene.camera = cam
cam.rotation_mode = 'XYZ'
# a crane up and a pan right, easing in and out (Blender's Bezier keys; the exporter samples them)
for frame, loc, rot in [
    (1, (-3.0, -12.0, 1.2), (84.0, 0.0, 18.0)),
    (24, (-1.0, -11.0, 2.6), (88.0, 0.0, 4.0)),
    (48, (1.5, -10.0, 3.6), (91.0, 0.0, -10.0)),
]:
    cam.location = loc
    cam.rotation_euler = [math.radians(a) for a in rot]
    cam.keyframe_insert('location', frame=frame)
    cam.keyframe_insert('rotation_euler', frame=frame)

def add(kind, name, **kw):
    getattr(bpy.ops.mesh, kind)(**kw)
    o = bpy.context.object
    o.name = name
    return o

add('primitive_plane_add', 'Roof', size=60.0, location=(0.0, 10.0, 0.0))
add('primitive_cube_add', 'Parapet', size=1.0, location=(0.0, 4.0, 0.5), scale=(30.0, 0.3, 1.0))
# the radio mast: a leg (a thin box) with the lamp just in front of its top; a thin antenna pole
# nearer the camera sweeps across the lamp as the camera pans
add('primitive_cube_add', 'MastLeg', size=1.0, location=(-1.6, 14.0, 2.5), scale=(0.3, 0.3, 5.0))
add('primitive_cylinder_add', 'AntennaPole', radius=0.06, depth=6.0, location=(-1.0, 2.0, 3.0))
add('primitive_cylinder_add', 'WaterTank', radius=0.7, depth=3.0, location=(1.0, 1.0, 3.2))

def point(name, pos, watts, colour):
    d = bpy.data.lights.new(name, 'POINT')
    d.energy = watts
    d.color = colour
    d.shadow_soft_size = 0.05
    o = bpy.data.objects.new(name, d)
    o.location = pos
    scene.collection.objects.link(o)
    return o

point('WarningLamp', (-1.6, 13.7, 5.1), 60.0, (1.0, 0.08, 0.03))
point('StreetLamp', (5.0, 40.0, 5.5), 400.0, (1.0, 0.55, 0.2))

bpy.context.view_layer.update()
bpy.ops.export_scene.gltf(filepath=os.path.join(OUT, 'rooftop.glb'), export_format='GLB', export_cameras=True, export_lights=True, export_animations=True, export_yup=True, export_apply=True)

# the depth pass only: no light, no world, so the colour channels are empty and compress away
for l in bpy.data.lights:
    l.energy = 0.0
scene.render.engine = 'CYCLES'
scene.cycles.device = 'CPU'
scene.cycles.samples = 1
scene.cycles.use_denoising = False
scene.cycles.filter_width = 0.01
scene.render.film_transparent = True
bpy.context.view_layer.use_pass_z = True
scene.render.image_settings.file_format = 'OPEN_EXR_MULTILAYER'
scene.render.image_settings.color_depth = '16'
scene.render.image_settings.exr_codec = 'ZIP'
scene.render.filepath = os.path.join(OUT, 'rooftop-depth', 'full.####')
bpy.ops.render.render(animation=True)

# keep the depth channel alone, as Z in half float (ZIP): about 9 KB a frame. Half float turns the
# empty sky's 1e10 into infinity, which covers nothing, as the sky should.
for full in sorted(glob.glob(os.path.join(OUT, 'rooftop-depth', 'full.*.exr'))):
    z = full.replace('full.', 'z.')
    subprocess.run(['oiiotool', full, '--ch', 'Z=ViewLayer.Depth.Z', '-d', 'half', '--compression', 'zip', '-o', z], check=True)
    os.remove(full)
