#!/usr/bin/python3
# Designs the landscape's colour scale (widgets/plot_style.cpp) and prints its stops.
#
#   /usr/bin/python3 scripts/colour_scale.py [swatch.png]
#
# The path runs in CIE LCh (D65): lightness L* rises linearly, the hue angle turns from 160
# (evergreen) through 250 (blue) and 300 (lilac) to 370 = 10 (blush), and the chroma is a
# sine bump (low at both ends, where sRGB has little room) reduced wherever sRGB cannot show
# it. The path is then resampled so that neighbouring stops are equally far apart in
# CIEDE2000 (Sharma, Wu & Dalal 2005). Two variants: light (L* 14..95) and dark (L* 12..84,
# a dimmer top for a dark window). With a PNG path, writes swatches: each variant under
# normal vision and simulated protanopia, deuteranopia and tritanopia (Machado, Oliveira &
# Fernandes 2009, severity 1).
import math
import struct
import sys
import zlib

import numpy as np

def to_lin(c):
    c=np.asarray(c,float); return np.where(c<=0.04045,c/12.92,((c+0.055)/1.055)**2.4)
def to_gam(c):
    c=np.asarray(c,float); return np.where(c<=0.0031308,12.92*c,1.055*np.abs(c)**(1/2.4)-0.055)
M=np.array([[0.4124,0.3576,0.1805],[0.2126,0.7152,0.0722],[0.0193,0.1192,0.9505]])
Mi=np.linalg.inv(M)
W=np.array([0.95047,1.0,1.08883])
def f(t): return np.where(t>0.008856,np.cbrt(t),7.787*t+16/116)
def finv(u): return np.where(u>0.206893,u**3,(u-16/116)/7.787)
def lin2lab(rgb):
    xyz=M@rgb; fx,fy,fz=f(xyz/W); return np.array([116*fy-16,500*(fx-fy),200*(fy-fz)])
def srgb2lab(c): return lin2lab(to_lin(c))
def lab2lin(lab):
    L,a,b=lab; fy=(L+16)/116; fx=fy+a/500; fz=fy-b/200
    xyz=np.array([finv(fx),finv(fy),finv(fz)])*W; return Mi@xyz
def lch2lab(L,C,h): return np.array([L,C*math.cos(math.radians(h)),C*math.sin(math.radians(h))])
PROT=np.array([[0.152286,1.052583,-0.204868],[0.114503,0.786281,0.099216],[-0.003882,-0.048116,1.051998]])
DEUT=np.array([[0.367322,0.860646,-0.227968],[0.280085,0.672501,0.047413],[-0.011820,0.042940,0.968881]])
TRIT=np.array([[1.255528,-0.076749,-0.178779],[-0.078411,0.930809,0.147602],[0.004733,0.691367,0.303900]])
def simulate(c,m):
    if m is None: return np.asarray(c,float)
    return np.clip(to_gam(np.clip(m@to_lin(c),0,1)),0,1)
def de2000(l1,l2):
    L1,a1,b1=l1; L2,a2,b2=l2
    C1=math.hypot(a1,b1); C2=math.hypot(a2,b2); Cb=(C1+C2)/2
    G=0.5*(1-math.sqrt(Cb**7/(Cb**7+25**7)))
    a1p=(1+G)*a1; a2p=(1+G)*a2
    C1p=math.hypot(a1p,b1); C2p=math.hypot(a2p,b2)
    h1p=math.degrees(math.atan2(b1,a1p))%360 if (a1p or b1) else 0
    h2p=math.degrees(math.atan2(b2,a2p))%360 if (a2p or b2) else 0
    dL=L2-L1; dC=C2p-C1p
    if C1p*C2p==0: dh=0
    else:
        dh=h2p-h1p
        if dh>180: dh-=360
        elif dh<-180: dh+=360
    dH=2*math.sqrt(C1p*C2p)*math.sin(math.radians(dh/2))
    Lb=(L1+L2)/2; Cbp=(C1p+C2p)/2
    if C1p*C2p==0: hb=h1p+h2p
    else:
        if abs(h1p-h2p)<=180: hb=(h1p+h2p)/2
        elif h1p+h2p<360: hb=(h1p+h2p+360)/2
        else: hb=(h1p+h2p-360)/2
    T=1-0.17*math.cos(math.radians(hb-30))+0.24*math.cos(math.radians(2*hb))+0.32*math.cos(math.radians(3*hb+6))-0.20*math.cos(math.radians(4*hb-63))
    dth=30*math.exp(-((hb-275)/25)**2)
    Rc=2*math.sqrt(Cbp**7/(Cbp**7+25**7))
    SL=1+0.015*(Lb-50)**2/math.sqrt(20+(Lb-50)**2)
    SC=1+0.045*Cbp; SH=1+0.015*Cbp*T
    RT=-math.sin(math.radians(2*dth))*Rc
    return math.sqrt((dL/SL)**2+(dC/SC)**2+(dH/SH)**2+RT*(dC/SC)*(dH/SH))
def hexs(c): return '#%02x%02x%02x'%tuple(int(round(v*255)) for v in c)
def fromhex(h): return np.array([int(h[i:i+2],16)/255 for i in (1,3,5)])
def png(path,rows):
    h=len(rows); w=len(rows[0])
    raw=b''.join(b'\x00'+bytes(int(round(v*255)) for px in r for v in px) for r in rows)
    def chunk(t,d): return struct.pack('>I',len(d))+t+d+struct.pack('>I',zlib.crc32(t+d)&0xffffffff)
    open(path,'wb').write(b'\x89PNG\r\n\x1a\n'+chunk(b'IHDR',struct.pack('>IIBBBBB',w,h,8,2,0,0,0))+chunk(b'IDAT',zlib.compress(raw))+chunk(b'IEND',b''))
def in_gamut(lab):
    rgb=lab2lin(lab); return np.all(rgb>=-1e-9) and np.all(rgb<=1+1e-9)
def colour_at(L,C,h):
    # reduce chroma until inside sRGB
    c=C
    while c>0 and not in_gamut(lch2lab(L,c,h)): c-=0.25
    return to_gam(np.clip(lab2lin(lch2lab(L,max(c,0),h)),0,1)), max(c,0)
def path(L0,L1,h0,h1,Cmax,shape=1.0,n=400):
    out=[]
    for i in range(n+1):
        t=i/n
        L=L0+(L1-L0)*t
        h=h0+(h1-h0)*t
        C=Cmax*(math.sin(math.pi*min(1,max(0,t*0.9+0.05))))**shape
        rgb,c=colour_at(L,C,h)
        out.append(rgb)
    return out
def uniform(cols,k):
    labs=[srgb2lab(c) for c in cols]
    d=[0]+[de2000(labs[i],labs[i+1]) for i in range(len(labs)-1)]
    s=np.cumsum(d); s/=s[-1]
    idx=[int(np.argmin(abs(s-t))) for t in np.linspace(0,1,k)]
    return [cols[i] for i in idx]
def report(stops,name):
    print(name,' '.join(hexs(c) for c in stops))
    labs=[srgb2lab(c) for c in stops]
    print(' L*',' '.join('%.1f'%l[0] for l in labs))
    print(' h ',' '.join('%.0f'%(math.degrees(math.atan2(l[2],l[1]))%360) for l in labs))
    print(' C ',' '.join('%.0f'%math.hypot(l[1],l[2]) for l in labs))
    for nm,m in [('normal',None),('protan',PROT),('deutan',DEUT),('tritan',TRIT)]:
        sl=[srgb2lab(simulate(c,m)) for c in stops]
        d=[de2000(sl[i],sl[i+1]) for i in range(len(sl)-1)]
        print(' %-7s adj dE00 min %.1f max %.1f; L mono %s'%(nm,min(d),max(d),all(sl[i+1][0]>sl[i][0] for i in range(len(sl)-1))))

VARIANTS = {"light": (14, 95), "dark": (12, 84)}
HUE_FROM, HUE_TO, CHROMA = 160, 370, 45


def stops(variant, count=11):
    lo, hi = VARIANTS[variant]
    return uniform(path(lo, hi, HUE_FROM, HUE_TO, CHROMA), count)


if __name__ == "__main__":
    rows = []
    for variant in VARIANTS:
        st = stops(variant)
        report(st, variant)
        for m in [None, PROT, DEUT, TRIT]:
            row = []
            for x in range(600):
                t = x / 599 * (len(st) - 1)
                i = min(int(t), len(st) - 2)
                u = t - i
                row.append(simulate(st[i] * (1 - u) + st[i + 1] * u, m))
            rows += [row] * 30 + [[np.array([1.0, 1.0, 1.0])] * 600] * 4
    if len(sys.argv) > 1:
        png(sys.argv[1], rows)
